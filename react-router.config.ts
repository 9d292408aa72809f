import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  appDirectory: "app",
  buildDirectory: "build",
  // React Router v8 behaviour, opted into early. v8_middleware: the load context is a RouterContextProvider
  // (app/.server/security/load-context.ts). v8_passThroughRequests: loaders see the raw request, `.data` suffix and
  // all; a page's own address comes from the `url` argument or pageUrl() in app/.server/http.ts.
  future: {
    v8_middleware: true,
    v8_passThroughRequests: true,
    v8_splitRouteModules: true,
    v8_viteEnvironmentApi: true,
    v8_trailingSlashAwareDataRequests: true,
  },
} satisfies Config;
