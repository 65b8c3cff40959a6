// auth-astro's client.ts takes its option types from 'next-auth/react', a package it lists only as a
// dev dependency, so they do not resolve here and every option reads as unknown. These are the fields
// of those types that auth-astro's signIn and signOut read (next-auth 4's react/types.d.ts).
declare module 'next-auth/react' {
  export type LiteralUnion<T extends U, U = string> = T | (U & Record<never, never>);
  export interface SignInOptions extends Record<string, unknown> {
    callbackUrl?: string;
    redirect?: boolean;
  }
  export type SignInAuthorizationParams = string | string[][] | Record<string, string> | URLSearchParams;
  export interface SignOutParams<R extends boolean = true> {
    callbackUrl?: string;
    redirect?: R;
  }
}
