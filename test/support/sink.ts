/** A writable stream that keeps what is written to it, for commands run in-process (stdout, stderr). */
import { Writable } from 'node:stream';

export function sink(): { stream: Writable; text: () => string } {
  let text = '';
  const stream = new Writable({
    write(chunk, _enc, done) {
      text += String(chunk);
      done();
    },
  });
  return { stream, text: () => text };
}
