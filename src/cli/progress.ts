// A one-line progress bar on a terminal (stderr); silent when stderr is not a TTY.
export interface Progress {
  update(done: number, total: number): void;
  finish(): void;
}

/** A progress bar writing to `stream` when it is a TTY, else a no-op. */
export function createProgress(label: string, stream: NodeJS.WriteStream = process.stderr): Progress {
  if (stream.isTTY !== true) return { update() {}, finish() {} };
  let last = '';
  return {
    update(done, total) {
      const width = 30;
      const filled = total === 0 ? width : Math.round((done / total) * width);
      const line = `\r${label} [${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${done}/${total}`;
      if (line !== last) stream.write(line);
      last = line;
    },
    finish() {
      if (last !== '') stream.write('\n');
    },
  };
}
