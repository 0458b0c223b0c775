/** Upload and estimate helpers shared by the datasets and estimates API tests. */
import fs from 'node:fs';
import path from 'node:path';
import { Dataset, EstimateRun } from '@/models';
import * as datasets from '@/app/api/v1/datasets/route';
import * as estimates from '@/app/api/v1/estimates/route';
import { listStoredFiles } from '@/lib/data/datasets';
import { browserHeaders, json, ORIGIN, params, req, type Who } from '../helpers/api';

export const FIXTURES = path.resolve(__dirname, '../../fixtures');

export function fixture(rel: string): Buffer {
  return fs.readFileSync(path.join(FIXTURES, rel));
}

export function multipart(
  who: Record<string, string>,
  file: { name: string; bytes: Uint8Array } | null,
  fields: Record<string, string | number> = {},
): Request {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.append(k, String(v));
  if (file) form.append('file', new Blob([new Uint8Array(file.bytes)]), file.name);
  return new Request(`${ORIGIN}/api/v1/datasets`, { method: 'POST', body: form, headers: who });
}

export async function upload(who: Who, name: string, bytes: Uint8Array, fields: Record<string, string | number> = {}) {
  const res = await datasets.POST(multipart(await browserHeaders(who), { name, bytes }, fields), params({}));
  return { status: res.status, body: await json(res) };
}

export async function estimate(who: Who, body: unknown, headers: Record<string, string> = {}) {
  const res = await estimates.POST(
    req('POST', '/api/v1/estimates', { body, headers: { ...(await browserHeaders(who)), ...headers } }),
    params({}),
  );
  return { status: res.status, body: await json(res) };
}

/** Rows, stored files and runs: what a refused upload must leave unchanged. */
export async function footprint() {
  return { datasets: await Dataset.count(), runs: await EstimateRun.count(), files: listStoredFiles() };
}
