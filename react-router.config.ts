import type { Config } from '@react-router/dev/config';

export default {
  ssr: true,
  future: {
    // No route uses middleware; loaders read the load context as AppLoadContext
    // (app/utils/load-context.server.ts). Set (not left out) so no future-flag warning is printed.
    v8_middleware: false,
    v8_splitRouteModules: true,
    v8_viteEnvironmentApi: true,
  },
} satisfies Config;
