/**
 * A full garbage collection in this job thread, run after a job that held a whole clip: a job
 * thread goes idle right after, so nothing would make V8 collect the clip's buffers (~106 MiB of
 * shared channels for 5 minutes of 44.1 kHz stereo) until the next job allocates, and then the two
 * clips would be resident together. Measured with the server benchmark's two analyses at once.
 *
 * V8 offers no collection call without its `--expose-gc` flag; set at run time, the flag gives a
 * new context a `gc` function (the flag itself changes nothing else).
 */
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

let gc: (() => void) | null | undefined;

/** Collects garbage now; does nothing where the runtime refuses. */
export function releaseMemory(): void {
  if (gc === undefined) {
    try {
      setFlagsFromString('--expose-gc');
      gc = runInNewContext('gc') as () => void;
    } catch {
      gc = null;
    }
  }
  gc?.();
}
