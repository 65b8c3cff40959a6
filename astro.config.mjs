import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwind from '@astrojs/tailwind';
import auth from 'auth-astro';

// Origins the app is reached at. Astro's origin check (on for form POSTs, sign-in included)
// builds request URLs from the Host header only when the host is allowed here; otherwise it
// assumes "localhost" and refuses same-origin posts from 127.0.0.1.
const extraHost = process.env.PUBLIC_ORIGIN ? new URL(process.env.PUBLIC_ORIGIN).hostname : null;
const allowedHosts = [...new Set(['127.0.0.1', 'localhost', ...(extraHost ? [extraHost] : [])])];

export default defineConfig({
  output: 'server',
  // Movable so two test suites can build side by side (docker-free-scripts/test.sh).
  outDir: process.env.EBB_OUT_DIR ?? './dist',
  adapter: node({ mode: 'standalone' }),
  integrations: [react(), tailwind({ applyBaseStyles: false }), auth()],
  server: { host: '127.0.0.1', port: 4321 },
  security: {
    checkOrigin: true,
    allowedDomains: allowedHosts.map((hostname) => ({ hostname })),
  },
  // Astro's own Content-Security-Policy (not in dev mode): a <meta> policy with hashes of the
  // scripts and styles it renders, nothing from another origin. The middleware adds the header
  // parts a <meta> cannot carry (frame-ancestors) and X-Frame-Options etc.
  experimental: {
    csp: {
      directives: [
        "default-src 'self'",
        "img-src 'self' data:",
        "font-src 'self'",
        "connect-src 'self'",
        "object-src 'none'",
        "base-uri 'self'",
        "form-action 'self'",
      ],
      scriptDirective: { resources: ["'self'"] },
      styleDirective: { resources: ["'self'"] },
    },
  },
  devToolbar: { enabled: false },
  telemetry: false,
  vite: { resolve: { dedupe: ['react', 'react-dom'] } },
});
