// Type checks only (tsconfig `paths`): auth-astro's entry is TypeScript source whose integration.ts
// fails one strict check of ours ('astroConfig.adapter' is possibly undefined), and tsc checks every
// .ts file it reaches. This declares the two things we import from it, with its own config types.
import type { AstroIntegration } from 'astro';
import type { AstroAuthConfig, FullAuthConfig } from 'auth-astro/src/config';

export declare function defineConfig(config: FullAuthConfig): FullAuthConfig;
declare const integration: (config?: AstroAuthConfig) => AstroIntegration;
export default integration;
