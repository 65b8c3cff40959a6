/// <reference types="astro/client" />

declare namespace App {
  interface Locals {
    /** Set by src/middleware.ts from the session; undefined when signed out. */
    user?: import('./lib/server/queries/users.ts').SessionUser;
    /** Night mode, read from the cookie so the first paint is already right. */
    night: boolean;
  }
}

// auth-astro's server.ts reads our auth.config.ts through this virtual module (its module.d.ts says
// the same, but also pulls in its integration source: see src/types/auth-astro-entry.d.ts).
declare module 'auth:config' {
  const config: import('auth-astro/src/config').FullAuthConfig;
  export default config;
}

// auth-astro ships TypeScript source that imports this untyped package.
declare module 'set-cookie-parser';
