// Children of the stack: long-running services and one-shot steps, with logs and orderly shutdown.

import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { isAlive, terminate } from "./proc";

export interface ServiceSpec {
  name: string;
  cmd: string;
  args: string[];
  env: Record<string, string | undefined>;
  logFile: string;
  /** also echo output to our stdout, each line prefixed with [name] */
  echo?: boolean;
  /** SIGTERM grace before SIGKILL */
  graceMs?: number;
}

interface Running {
  spec: ServiceSpec;
  child: ChildProcess;
  exited: Promise<number>;
}

export interface StepOptions {
  env: Record<string, string | undefined>;
  /** "inherit": show live; "log": only to logFile; "tee": show live and keep the text */
  output: "inherit" | "log" | "tee";
  logFile?: string;
}

export class Supervisor {
  private services: Running[] = [];
  private step: ChildProcess | null = null;
  stopping = false;
  onUnexpectedExit: (name: string, code: number) => void = () => {};

  constructor(
    private readonly root: string,
    private readonly stateFile: string,
  ) {}

  private writeState() {
    const state = {
      supervisorPid: process.pid,
      root: this.root,
      children: Object.fromEntries(this.services.map((s) => [s.spec.name, s.child.pid])),
      updatedAt: new Date().toISOString(),
    };
    fs.writeFileSync(this.stateFile, JSON.stringify(state, null, 2) + "\n");
  }

  clearState() {
    fs.rmSync(this.stateFile, { force: true });
  }

  start(spec: ServiceSpec): Running {
    fs.mkdirSync(path.dirname(spec.logFile), { recursive: true });
    const log = fs.createWriteStream(spec.logFile, { flags: "a" });
    log.write(`\n--- ${new Date().toISOString()} start ${spec.cmd} ${spec.args.join(" ")}\n`);
    // Own process group: a terminal Ctrl-C reaches only us, and we stop the children in order.
    const child = spawn(spec.cmd, spec.args, {
      cwd: this.root,
      env: spec.env as NodeJS.ProcessEnv,
      stdio: ["ignore", "pipe", "pipe"],
      detached: true,
    });
    const forward = (stream: NodeJS.ReadableStream) => {
      let pending = "";
      stream.on("data", (buf: Buffer) => {
        log.write(buf);
        if (!spec.echo) return;
        pending += buf.toString("utf8");
        const lines = pending.split("\n");
        pending = lines.pop() ?? "";
        for (const line of lines) process.stdout.write(`[${spec.name}] ${line}\n`);
      });
    };
    forward(child.stdout!);
    forward(child.stderr!);
    const exited = new Promise<number>((resolve) => {
      child.on("error", (err) => {
        log.write(`spawn error: ${err.message}\n`);
        resolve(127);
      });
      child.on("exit", (code, signal) => {
        const c = code ?? (signal ? 128 : 1);
        log.write(`--- exited ${code ?? signal}\n`);
        log.end();
        this.services = this.services.filter((s) => s.child !== child);
        if (!this.stopping) this.onUnexpectedExit(spec.name, c);
        resolve(c);
      });
    });
    const running = { spec, child, exited };
    this.services.push(running);
    this.writeState();
    return running;
  }

  isRunning(name: string): boolean {
    return this.services.some((s) => s.spec.name === name);
  }

  /** Run a command to completion. Resolves with its exit code and (for "tee"/"log") its output. */
  run(name: string, cmd: string, args: string[], o: StepOptions): Promise<{ code: number; output: string }> {
    return new Promise((resolve) => {
      if (this.stopping) return resolve({ code: 130, output: "" });
      const log = o.logFile ? fs.createWriteStream(o.logFile, { flags: "a" }) : null;
      const child = spawn(cmd, args, {
        cwd: this.root,
        env: o.env as NodeJS.ProcessEnv,
        stdio: o.output === "inherit" ? ["ignore", "inherit", "inherit"] : ["ignore", "pipe", "pipe"],
        detached: true,
      });
      this.step = child;
      let output = "";
      const collect = (buf: Buffer) => {
        const s = buf.toString("utf8");
        output += s;
        if (output.length > 4_000_000) output = output.slice(-2_000_000);
        log?.write(buf);
        if (o.output === "tee") process.stdout.write(buf);
      };
      child.stdout?.on("data", collect);
      child.stderr?.on("data", collect);
      child.on("error", (err) => {
        output += `\n${name}: ${err.message}\n`;
      });
      child.on("close", (code, signal) => {
        this.step = null;
        log?.end();
        resolve({ code: code ?? (signal ? 128 : 1), output });
      });
    });
  }

  /** Stop the current step and every service, newest first. */
  async stopAll(): Promise<void> {
    this.stopping = true;
    if (this.step?.pid) await terminate(this.step.pid, 3000);
    const services = [...this.services].reverse();
    for (const s of services) {
      if (s.child.pid && isAlive(s.child.pid)) await terminate(s.child.pid, s.spec.graceMs ?? 8000);
      await Promise.race([s.exited, new Promise((r) => setTimeout(r, 2000))]);
    }
  }
}
