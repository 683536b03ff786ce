/** Whether a process of this machine is running (a leftover file's writer, by the pid in its name). */
export function processAlive(pid: number) {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === "EPERM"; // alive, but not ours to signal
  }
}
