// Which data files take the streamed path (main/pipeline/stream-study.ts): a small module of its
// own, so that `check` (main/api/check.ts) can ask without loading the streamed pipeline.

import { statSync } from 'node:fs';
import { extname } from 'node:path';
import type { Study } from '../contract/study.ts';

/** A CSV file from this size on is streamed unless the study says `data.stream: false`. */
export const STREAM_CSV_BYTES = 512 * 1024 * 1024;

/** Whether the study's data file takes the streamed path: Parquet always, CSV when asked for or large. */
export function isStreamedStudy(study: Study, dataBytes: number | null): boolean {
  if (extname(study.data.path).toLowerCase() === '.parquet') return true;
  if (extname(study.data.path).toLowerCase() !== '.csv') return false;
  if (study.data.stream === true) return true;
  if (study.data.stream === false) return false;
  return dataBytes !== null && dataBytes >= STREAM_CSV_BYTES;
}

/** The data file's size in bytes, or null when it cannot be read (the reader then says why). */
export function dataFileBytes(path: string): number | null {
  try {
    return statSync(path).size;
  } catch {
    return null;
  }
}
