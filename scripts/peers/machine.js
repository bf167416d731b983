// The facts about the machine that belong beside any speed figure.
import { readFileSync } from 'node:fs';
import os from 'node:os';

/** CPU model (from /proc/cpuinfo when readable), core counts, memory and Node version. */
export function describeMachine() {
  let cpuModel = os.cpus()[0]?.model ?? 'unknown';
  let megahertz = null;
  try {
    const info = readFileSync('/proc/cpuinfo', 'utf8');
    cpuModel = /^model name\s*:\s*(.+)$/m.exec(info)?.[1]?.trim() ?? cpuModel;
    const mhz = /^cpu MHz\s*:\s*([\d.]+)$/m.exec(info)?.[1];
    if (mhz !== undefined) megahertz = Number(mhz);
  } catch {
    // Not Linux: os.cpus() is all there is.
  }
  return {
    cpuModel,
    megahertz,
    logicalCores: os.cpus().length,
    availableParallelism: os.availableParallelism(),
    memoryGiB: os.totalmem() / 2 ** 30,
    node: process.version,
    platform: `${os.type()} ${os.release()} ${os.arch()}`,
  };
}

/**
 * The 1-minute load average (os.loadavg; 0 where the OS does not report it). Speed
 * figures taken while other work keeps the cores busy are slower, so the benchmark
 * prints this before and after its run.
 */
export function loadAverage() {
  return os.loadavg()[0];
}
