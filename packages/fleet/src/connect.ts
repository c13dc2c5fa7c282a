import { Cluster, Redis } from "ioredis";
import { OptionError } from "@leeway/core";
import type { RedisClient } from "./scripts.js";

/**
 * Opens a connection to a fleet's Redis: one server, or (with `cluster`) a
 * Redis Cluster discovered from one of its nodes, with auto-pipelining so
 * that commands to one node travel together.
 * @example
 * const redis = openRedis("redis://127.0.0.1:6379");
 * await redis.ping(); // "PONG"
 */
export function openRedis(url: string, options: { cluster?: boolean } = {}): RedisClient {
  let parsed: URL;
  try {
    parsed = new URL(url);
  } catch {
    throw new OptionError("openRedis", "url", url, "a URL like redis://127.0.0.1:6379");
  }
  if (parsed.protocol !== "redis:") throw new OptionError("openRedis", "url", url, "a URL starting with redis://");
  const client: RedisClient = options.cluster !== true ? new Redis(url, { maxRetriesPerRequest: 20 }) : new Cluster([{ host: parsed.hostname, port: Number(parsed.port || 6379) }], { enableAutoPipelining: true });
  // Connection errors reach the caller as refused commands; the client reconnects by itself.
  client.on("error", () => undefined);
  return client;
}
