/// <reference types="astro/client" />
/// <reference types="auth-astro" />

declare namespace App {
  interface Locals {
    /** Set by src/middleware.ts from the session; undefined when signed out. */
    user?: import('./lib/server/queries/users.ts').SessionUser;
    /** Night mode, read from the cookie so the first paint is already right. */
    night: boolean;
  }
}

// auth-astro ships TypeScript source that imports this untyped package.
declare module 'set-cookie-parser';
