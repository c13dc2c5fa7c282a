import { createHash } from "node:crypto";
import type { Cluster, Redis } from "ioredis";

/** A connection to one Redis server or to a Redis Cluster. */
export type RedisClient = Redis | Cluster;

/** A Lua script run by its SHA-1 (EVALSHA), sent whole (EVAL) when the server does not know it yet, as after a restart. */
export class LuaScript {
  readonly source: string;
  readonly sha: string;
  constructor(source: string) {
    this.source = source;
    this.sha = createHash("sha1").update(source).digest("hex");
  }
  /** Runs the script with `keys` (all in one slot) and `args`. */
  async run(client: RedisClient, keys: readonly string[], args: readonly (string | Buffer | number)[]): Promise<unknown> {
    try {
      return await client.evalsha(this.sha, keys.length, ...keys, ...args);
    } catch (error) {
      if (!(error instanceof Error) || !error.message.startsWith("NOSCRIPT")) throw error;
      return await client.eval(this.source, keys.length, ...keys, ...args);
    }
  }
}

// Lease value: "<owner>:<token>". The token is the partition's fencing token: it
// grows by one with every new owner (HINCRBY on meta.fence), and every commit
// must carry the current one (Kleppmann, "How to do distributed locking", 2016).

/**
 * KEYS: meta, lease. ARGV: owner, lease ms.
 * Takes the lease when it is free (a new token) or renews it when the caller
 * holds it already (its token). Returns {token, offset, consumed, checkpoint}
 * or nil when another owner holds it (a partition written before checkpoints
 * existed has its snapshots at its offset).
 */
export const ACQUIRE = new LuaScript(`
local holder = redis.call('GET', KEYS[2])
local token
if holder then
  local owner, held = string.match(holder, '^(.*):(%d+)$')
  if owner ~= ARGV[1] then return nil end
  token = held
  redis.call('PEXPIRE', KEYS[2], ARGV[2])
else
  token = tostring(redis.call('HINCRBY', KEYS[1], 'fence', 1))
  redis.call('SET', KEYS[2], ARGV[1] .. ':' .. token, 'PX', ARGV[2])
end
local m = redis.call('HMGET', KEYS[1], 'offset', 'consumed', 'checkpoint')
return {token, m[1] or '0-0', m[2] or '0', m[3] or m[1] or '0-0'}
`);

/** KEYS: meta, lease. ARGV: owner, token, lease ms. 1 when renewed; 0 when the token is no longer current. */
export const RENEW = new LuaScript(`
if redis.call('HGET', KEYS[1], 'fence') ~= ARGV[2] then return 0 end
local holder = redis.call('GET', KEYS[2])
if holder and holder ~= ARGV[1] .. ':' .. ARGV[2] then return 0 end
redis.call('SET', KEYS[2], ARGV[1] .. ':' .. ARGV[2], 'PX', ARGV[3])
return 1
`);

/** KEYS: lease. ARGV: owner, token. Gives the lease up (1) if the caller still holds it. */
export const RELEASE = new LuaScript(`
if redis.call('GET', KEYS[1]) == ARGV[1] .. ':' .. ARGV[2] then return redis.call('DEL', KEYS[1]) end
return 0
`);

/**
 * KEYS: meta, lease, snapshots, output, dead, alarms, quarantine.
 * ARGV: owner, token, expected offset, new offset, consumed, lease ms,
 * checkpoint ("1": the snapshots below hold every engine changed since the
 * last checkpoint, so meta.checkpoint moves to the new offset; "0": they are
 * none; a partition without a stored checkpoint gets the old offset as its
 * checkpoint), then five sections, each a count followed by its items:
 *   snapshots   (stream, bytes) pairs            → HSET snapshots
 *   outputs     (n, field, value × n) entries    → XADD output
 *   dead        (n, field, value × n) entries    → XADD dead
 *   alarms      (stream, site or "") pairs       → HSET alarms / HDEL when ""
 *   quarantine  (stream, reason) pairs           → HSET quarantine, HDEL snapshots
 * Refuses (an error reply starting FENCED or OFFSET) unless the token is the
 * partition's current one and the stored offset is the expected one; then
 * applies everything, moves the offset (and the checkpoint) and renews the
 * lease, atomically.
 */
export const COMMIT = new LuaScript(`
local fence = redis.call('HGET', KEYS[1], 'fence')
if fence ~= ARGV[2] then
  return redis.error_reply('FENCED token ' .. ARGV[2] .. ' of ' .. ARGV[1] .. ' is stale; the current token is ' .. tostring(fence))
end
local holder = redis.call('GET', KEYS[2])
if holder and holder ~= ARGV[1] .. ':' .. ARGV[2] then
  return redis.error_reply('FENCED the lease is held by ' .. holder)
end
local offset = redis.call('HGET', KEYS[1], 'offset') or '0-0'
if offset ~= ARGV[3] then
  return redis.error_reply('OFFSET expected ' .. ARGV[3] .. ', stored ' .. offset)
end
local i = 8
local n = tonumber(ARGV[i]); i = i + 1
for _ = 1, n do redis.call('HSET', KEYS[3], ARGV[i], ARGV[i + 1]); i = i + 2 end
for _, key in ipairs({KEYS[4], KEYS[5]}) do
  n = tonumber(ARGV[i]); i = i + 1
  for _ = 1, n do
    local width = tonumber(ARGV[i])
    redis.call('XADD', key, '*', unpack(ARGV, i + 1, i + 2 * width))
    i = i + 1 + 2 * width
  end
end
n = tonumber(ARGV[i]); i = i + 1
for _ = 1, n do
  if ARGV[i + 1] == '' then redis.call('HDEL', KEYS[6], ARGV[i]) else redis.call('HSET', KEYS[6], ARGV[i], ARGV[i + 1]) end
  i = i + 2
end
n = tonumber(ARGV[i]); i = i + 1
for _ = 1, n do
  redis.call('HSET', KEYS[7], ARGV[i], ARGV[i + 1])
  redis.call('HDEL', KEYS[3], ARGV[i])
  i = i + 2
end
redis.call('HSET', KEYS[1], 'offset', ARGV[4], 'consumed', ARGV[5])
if ARGV[7] == '1' then
  redis.call('HSET', KEYS[1], 'checkpoint', ARGV[4])
elseif redis.call('HEXISTS', KEYS[1], 'checkpoint') == 0 then
  redis.call('HSET', KEYS[1], 'checkpoint', ARGV[3])
end
redis.call('SET', KEYS[2], ARGV[1] .. ':' .. ARGV[2], 'PX', ARGV[6])
return 1
`);
