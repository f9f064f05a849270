// A closed reader on stdout, noticed while a long run writes nothing yet: `glidepath verify | head -1`
// should stop when head has gone, not when the run ends and its first write fails. Node learns of a
// closed pipe only on a write, so on Linux this looks for the pipe's read end among the processes'
// open files (/proc). It stops a run only after it has seen a reader and then sees none: a reader it
// cannot see (another user's process, another PID namespace) never stops anything.
import { readdirSync, readFileSync, readlinkSync } from "node:fs";

/** Whether some process holds the read end of the pipe `link` ("pipe:[inode]"); null when that cannot be told. */
function readerPresent(link: string): boolean | null {
  let pids: string[];
  try {
    pids = readdirSync("/proc").filter((p) => /^\d+$/.test(p) && Number(p) !== process.pid);
  } catch {
    return null;
  }
  for (const pid of pids) {
    let fds: string[];
    try {
      fds = readdirSync(`/proc/${pid}/fd`);
    } catch {
      continue; // gone, or not ours to read
    }
    for (const fd of fds) {
      try {
        if (readlinkSync(`/proc/${pid}/fd/${fd}`) !== link) continue;
        const flags = /^flags:\s+([0-7]+)/m.exec(readFileSync(`/proc/${pid}/fdinfo/${fd}`, "utf8"))?.[1];
        if (flags !== undefined && (Number.parseInt(flags, 8) & 3) === 0) return true; // O_RDONLY: a read end
      } catch {
        // the process or descriptor went away meanwhile
      }
    }
  }
  return false;
}

/**
 * Calls `onGone` once when stdout is a pipe whose reader was seen and has since closed it; checks
 * every `everyMs` without keeping the process alive. Does nothing where stdout is not a pipe.
 * @example watchStdoutReader(() => process.exit(0));
 */
export function watchStdoutReader(onGone: () => void, everyMs = 500): void {
  let link: string;
  try {
    link = readlinkSync("/proc/self/fd/1");
  } catch {
    return;
  }
  if (!/^pipe:\[\d+\]$/.test(link)) return;
  let seen = readerPresent(link) === true;
  const timer = setInterval(() => {
    const present = readerPresent(link);
    if (present === true) seen = true;
    else if (present === false && seen) {
      clearInterval(timer);
      onGone();
    }
  }, everyMs);
  timer.unref();
}
