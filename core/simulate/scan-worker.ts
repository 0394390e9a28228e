import { parentPort, workerData, type Transferable } from 'node:worker_threads';
import { scanOnePosition, type ScanContext, type ScanPosition } from './scanner.js';

/** Worker thread of `scanSceneParallel`: scans the positions it is given and sends their columns back. */
const { ctx, positions } = workerData as { ctx: ScanContext; positions: ScanPosition[] };
const parts = positions.map((p) => scanOnePosition(ctx, p));
parentPort!.postMessage(
  parts,
  parts.flatMap((p) => [p.x.buffer, p.y.buffer, p.z.buffer, p.intensity.buffer, p.segment.buffer, p.label.buffer] as Transferable[]),
);
