// Where the scale-out mode keeps things in Redis, and the scripts that change a job record atomically.

export function redisKeys(prefix: string) {
  return {
    record: (id: string) => `${prefix}:job:${id}`,
    result: (hash: string) => `${prefix}:result:${hash}`,
    /** A sequence job's finished frames while it runs (pipeline/jobs/redis-frame-store.ts). */
    frames: (hash: string) => `${prefix}:frames:${hash}`,
    events: (id: string) => `${prefix}:events:${id}`,
    eventsPattern: `${prefix}:events:*`,
    cancel: `${prefix}:cancel`,
    /** When this Redis's data set began (set once): records of older jobs missing from it were lost with Redis's data. */
    dataSince: `${prefix}:since`,
    queue: "jobs",
    bullPrefix: `${prefix}:bull`,
  };
}

/**
 * KEYS[1] record; ARGV: new state, events channel, ttl seconds, then field/value pairs. A finished record (done,
 * failed, cancelled) never changes again, so a late worker cannot undo a cancellation.
 */
export const transitionScript = `
local s = redis.call('HGET', KEYS[1], 'state')
if not s then return false end
if s == 'done' or s == 'failed' or s == 'cancelled' then return s end
redis.call('HSET', KEYS[1], 'state', ARGV[1])
for i = 4, #ARGV, 2 do redis.call('HSET', KEYS[1], ARGV[i], ARGV[i + 1]) end
if ARGV[1] == 'running' then redis.call('HINCRBY', KEYS[1], 'attempts', 1) end
redis.call('EXPIRE', KEYS[1], ARGV[3])
redis.call('PUBLISH', ARGV[2], ARGV[1])
return ARGV[1]
`;

/**
 * KEYS[1] record; ARGV: fraction, stage, events channel, seconds left ("" for none). Only a running job's progress
 * moves, and only up (a retried attempt is heard again once it passes where the last one got).
 */
export const progressScript = `
if redis.call('HGET', KEYS[1], 'state') ~= 'running' then return 0 end
local f = tonumber(redis.call('HGET', KEYS[1], 'fraction') or '0')
if tonumber(ARGV[1]) <= f then return 0 end
redis.call('HSET', KEYS[1], 'fraction', ARGV[1], 'stage', ARGV[2], 'secondsLeft', ARGV[4])
redis.call('PUBLISH', ARGV[3], 'progress')
return 1
`;
