import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  appDirectory: "app",
  buildDirectory: "build",
  // React Router v8 behaviour, opted into early. Not yet: v8_middleware (the load context becomes a
  // RouterContextProvider; routes read clientAddress and cspNonce from it) and v8_passThroughRequests (request.url
  // then keeps the `.data` suffix that redirects built from it would carry).
  future: {
    v8_splitRouteModules: true,
    v8_viteEnvironmentApi: true,
    v8_trailingSlashAwareDataRequests: true,
  },
} satisfies Config;
