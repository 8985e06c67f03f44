/**
 * rate-limiter-flexible documents RateLimiterStoreAbstract as the base for custom stores and types
 * it in its index, but its index does not export the class at run time; lib/auth/limiterStore.ts
 * imports it from its file, with the index's types.
 */
declare module 'rate-limiter-flexible/lib/RateLimiterStoreAbstract' {
  import { RateLimiterStoreAbstract } from 'rate-limiter-flexible';
  export = RateLimiterStoreAbstract;
}
