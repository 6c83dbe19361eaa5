import { reactRouter } from '@react-router/dev/vite';
import tailwindcss from '@tailwindcss/vite';
import { defineConfig } from 'vite';

export default defineConfig({
  plugins: [tailwindcss(), reactRouter()],
  resolve: { tsconfigPaths: true },
  server: {
    watch: { ignored: ['**/.data/**', '**/build/**', '**/test-results/**'] },
  },
  optimizeDeps: {
    include: [
      'react',
      'react-dom',
      'react-dom/client',
      'react-router',
      'react-router/dom',
      '@tanstack/react-table',
      'socket.io-client',
      'zod',
      'recharts',
      'papaparse',
      // pure-rand 8 exports only subpaths (no "."): name the ones app/lib/rng.ts imports.
      'pure-rand/distribution/uniformInt',
      'pure-rand/generator/xoroshiro128plus',
    ],
    exclude: ['mysql2', 'drizzle-orm', 'nodemailer', 'remix-auth', 'remix-auth-totp'],
  },
});
