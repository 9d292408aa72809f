import crypto from "node:crypto";
import type { RequestHandler } from "express";
import helmet from "helmet";

/**
 * Security headers for every response the HTTP server sends: pages, JSON, the calendar feed, files and errors.
 * Scripts run only from our own origin or inline with this response's nonce (React Router writes its hydration data
 * inline); stylesheets come from our origin, and inline `style` attributes are allowed because React's style props
 * write them. No page may be framed, types are not sniffed, and a URL (reset and invitation links carry tokens)
 * never leaves the site as a referrer.
 *
 * `csp: false` is for the development server, whose hot-reload client injects scripts without a nonce.
 */
export function securityHeaders(opts: { appUrl: string; csp?: boolean }): RequestHandler[] {
  const https = opts.appUrl.startsWith("https://");
  const nonce: RequestHandler = (_req, res, next) => {
    res.locals.cspNonce = crypto.randomBytes(16).toString("base64");
    next();
  };
  const headers = helmet({
    contentSecurityPolicy:
      opts.csp === false
        ? false
        : {
            useDefaults: false,
            directives: {
              defaultSrc: ["'self'"],
              scriptSrc: [
                "'self'",
                (_req, res) => `'nonce-${(res as unknown as { locals: { cspNonce: string } }).locals.cspNonce}'`,
              ],
              scriptSrcAttr: ["'none'"],
              styleSrc: ["'self'"],
              styleSrcElem: ["'self'"],
              styleSrcAttr: ["'unsafe-inline'"],
              // QR codes for the calendar feed are data: URLs.
              imgSrc: ["'self'", "data:"],
              fontSrc: ["'self'"],
              connectSrc: ["'self'"],
              objectSrc: ["'none'"],
              baseUri: ["'self'"],
              frameAncestors: ["'none'"],
              // Checkout posts to our server and is redirected to the payment provider's page, which form-action
              // would also have to name; it is left open rather than tied to one provider's host.
              ...(https ? { upgradeInsecureRequests: [] } : {}),
            },
          },
    frameguard: { action: "deny" },
    referrerPolicy: { policy: "same-origin" },
    // Browsers ignore HSTS over plain http; sent only where the public URL is https.
    strictTransportSecurity: https ? { maxAge: 180 * 24 * 3600, includeSubDomains: false } : false,
    crossOriginEmbedderPolicy: false,
  });
  return [nonce, headers];
}
