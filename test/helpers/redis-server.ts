// The fault tests' own redis-server (never the shared one): the benchmarks' helper, bench/own-redis.ts.
export { ownRedis, redisServerPresent, type OwnRedis } from "../../bench/own-redis.js";
