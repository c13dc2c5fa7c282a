import { spawn, type ChildProcess } from "node:child_process";
import { afterAll, beforeAll } from "vitest";
import { openRedis, type RedisClient } from "@leeway/fleet";
import { mkdtempSync, rmSync } from "node:fs";
import { createServer, Socket } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";

/** A free loopback TCP port (the OS picks it; it is free again when this returns). */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const port = (server.address() as { port: number }).port;
      server.close(() => resolve(port));
    });
  });
}

const running = new Set<ChildProcess>();
process.once("exit", () => {
  for (const child of running) child.kill("SIGKILL");
});

async function answersPing(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = new Socket();
    const done = (ok: boolean): void => {
      socket.destroy();
      resolve(ok);
    };
    socket.setTimeout(500, () => done(false));
    socket.once("error", () => done(false));
    socket.connect(port, "127.0.0.1", () => socket.write("PING\r\n"));
    socket.once("data", (data) => done(data.toString().startsWith("+PONG")));
  });
}

/**
 * A redis-server of its own for a test: loopback only, a free port, a
 * temporary directory, the append-only file with `appendfsync always`
 * (every write on disk before it is acknowledged), no RDB saves.
 */
export class RedisServer {
  readonly port: number;
  readonly dir: string;
  readonly cluster: boolean;
  #child: ChildProcess | null = null;

  private constructor(port: number, dir: string, cluster: boolean) {
    this.port = port;
    this.dir = dir;
    this.cluster = cluster;
  }

  static async start(options: { cluster?: boolean } = {}): Promise<RedisServer> {
    const server = new RedisServer(await freePort(), mkdtempSync(join(tmpdir(), "leeway-redis-")), options.cluster === true);
    await server.#launch();
    return server;
  }

  get url(): string {
    return `redis://127.0.0.1:${this.port}`;
  }

  async #launch(): Promise<void> {
    const args = ["--port", String(this.port), "--bind", "127.0.0.1", "--dir", this.dir, "--save", "", "--appendonly", "yes", "--appendfsync", "always", "--logfile", join(this.dir, "redis.log"), "--daemonize", "no"];
    if (this.cluster) args.push("--cluster-enabled", "yes", "--cluster-config-file", join(this.dir, "nodes.conf"), "--cluster-node-timeout", "3000");
    const child = spawn("redis-server", args, { stdio: "ignore" });
    running.add(child);
    child.once("exit", () => running.delete(child));
    this.#child = child;
    for (let i = 0; i < 200; i++) {
      if (child.exitCode !== null) throw new Error(`redis-server exited with code ${child.exitCode} (log: ${join(this.dir, "redis.log")})`);
      if (await answersPing(this.port)) return;
      await new Promise((r) => setTimeout(r, 50));
    }
    throw new Error(`redis-server on port ${this.port} did not answer PING within 10 s`);
  }

  /** Kills the server at once (SIGKILL) and waits for it to exit. */
  async kill(): Promise<void> {
    const child = this.#child;
    this.#child = null;
    if (child === null || child.exitCode !== null) return;
    await new Promise<void>((resolve) => {
      child.once("exit", () => resolve());
      child.kill("SIGKILL");
    });
  }

  /** Kills the server and starts it again on the same port and directory (it reloads the append-only file). */
  async restart(): Promise<void> {
    await this.kill();
    await this.#launch();
  }

  /** Kills the server and removes its directory. */
  async stop(): Promise<void> {
    await this.kill();
    rmSync(this.dir, { recursive: true, force: true });
  }
}

/** A Redis server and a client shared by one test file: started before its tests, stopped after them. */
export interface SharedRedis {
  readonly server: RedisServer;
  readonly redis: RedisClient;
}

/** Registers the hooks that start a loopback redis-server (and open a client) for the calling test file and stop both afterwards. */
export function sharedRedis(): SharedRedis {
  const held: { server?: RedisServer; redis?: RedisClient } = {};
  beforeAll(async () => {
    held.server = await RedisServer.start();
    held.redis = openRedis(held.server.url);
  });
  afterAll(async () => {
    await held.redis?.quit().catch(() => undefined);
    await held.server?.stop();
  });
  return {
    get server(): RedisServer {
      return held.server as RedisServer;
    },
    get redis(): RedisClient {
      return held.redis as RedisClient;
    },
  };
}
