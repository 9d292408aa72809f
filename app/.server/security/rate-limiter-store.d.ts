declare module "rate-limiter-flexible/lib/RateLimiterStoreAbstract.js" {
  import { RateLimiterStoreAbstract } from "rate-limiter-flexible";
  export default RateLimiterStoreAbstract;
}
