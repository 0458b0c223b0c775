import 'server-only';
import type { Caller } from '../auth';
import { renderBtrPng } from '../btr/png';
import {
  findFinishedRecord,
  getBearingTimeRecord,
  readLevels,
  type BtrBlockDto,
  type BtrTrackDto,
} from './bearing-time-records';

/**
 * Exports of a finished bearing–time record (GET /api/v1/bearing-time-records/{id}/export):
 *  - csv: `block,startS,endS,sourceCount,bearingDeg,stdDeg,trackId`, one row per block bearing
 *    (a block without bearings gives one row with empty bearing fields); trackId is the track
 *    the bearing updated, empty when none;
 *  - json: the record exactly as GET /api/v1/bearing-time-records/{id} answers it;
 *  - png: lib/btr/png.ts at full block resolution (up to its row limit).
 */
export type BtrExportFormat = 'csv' | 'json' | 'png';

export function btrCsv(blocks: BtrBlockDto[], tracks: BtrTrackDto[]): string {
  const owner = new Map<string, number>();
  for (const t of tracks) for (const p of t.points) owner.set(`${p.blockIndex}:${p.measuredDeg}`, t.id);
  const lines = ['block,startS,endS,sourceCount,bearingDeg,stdDeg,trackId'];
  for (const b of blocks) {
    const head = `${b.index},${b.startS},${b.endS},${b.sourceCount}`;
    if (b.bearingsDeg.length === 0) lines.push(`${head},,,`);
    b.bearingsDeg.forEach((deg, i) => {
      const track = owner.get(`${b.index}:${deg}`);
      lines.push(`${head},${deg},${b.stdDeg[i] ?? ''},${track ?? ''}`);
    });
  }
  return lines.join('\n') + '\n';
}

export async function exportBearingTimeRecord({
  caller,
  id,
  format,
}: {
  caller: Caller;
  id: number;
  format: BtrExportFormat;
}): Promise<{ body: Buffer; contentType: string; fileName: string }> {
  const row = await findFinishedRecord({ caller, id });
  const dto = await getBearingTimeRecord({ caller, id });
  const base = `bearing-time-record-${id}`;
  if (format === 'json') {
    return { body: Buffer.from(JSON.stringify(dto)), contentType: 'application/json', fileName: `${base}.json` };
  }
  if (format === 'csv') {
    return {
      body: Buffer.from(btrCsv(dto.blocks, dto.tracks)),
      contentType: 'text/csv; charset=utf-8',
      fileName: `${base}.csv`,
    };
  }
  const { levels, rows, grid } = await readLevels(row);
  const png = renderBtrPng({
    levels,
    rows,
    grid,
    timesS: dto.blocks.map((b) => 0.5 * (b.startS + b.endS)),
    tracks: dto.tracks,
  });
  return { body: png, contentType: 'image/png', fileName: `${base}.png` };
}
