/**
 * The whole hand-off in the browser, two users in different teams: the
 * engineer (Kestrel Sound Laboratory) makes an array, a dataset and a run
 * through the v1 API with their browser session, sends the bundle by e-mail
 * from the hand-off panel; the reviewer signs off revision 1; the range admin
 * (Gannet Point Radar Range) finds the message in their outbox, follows the
 * link, imports, and sees "reproduced". Screenshots in test-results/.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { snapshotsCsv } from '../lib/handoff/fixtures';
import { browserForFile, csrf, shot, signIn } from './browser';

const { browser, open } = browserForFile();

describe('hand-off between two teams', () => {
  it('export, e-mail, sign-off, open the link as the colleague, import, reproduced', async () => {
    const stamp = Date.now().toString(36);
    const arrayName = `Port Alder inshore line ${stamp}`;

    // 1. Engineer: an array, a dataset and a two-method run through the API with the browser session.
    const eng = await open();
    await signIn(eng.page, 'engineer@steerwise.test', DEMO_PASSWORD);
    const token = await csrf(eng.page);
    const created = await eng.page.request.post('/api/v1/arrays', {
      headers: { 'x-csrf-token': token },
      data: { name: arrayName, elements: 8, spacing: { value: 0.5, unit: 'wavelength' } },
    });
    expect(created.status(), await created.text()).toBe(201);
    const arrayId = ((await created.json()) as { id: number }).id;
    const csv = snapshotsCsv({
      elements: 8,
      spacingWavelengths: 0.5,
      bearingsDeg: [-12, 21],
      snapshots: 150,
      seed: 11,
    });
    const uploaded = await eng.page.request.post('/api/v1/datasets', {
      headers: { 'x-csrf-token': token },
      multipart: {
        file: { name: 'trial-4.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) },
        name: `Trial 4 ${stamp}`,
        arrayId: String(arrayId),
      },
    });
    expect(uploaded.status(), await uploaded.text()).toBe(201);
    const datasetId = ((await uploaded.json()) as { id: number }).id;
    const run = await eng.page.request.post('/api/v1/estimates', {
      headers: { 'x-csrf-token': token },
      data: { datasetId, arrayId, methods: ['esprit-tls', 'root-music'], sourceCount: 2 },
    });
    expect(run.status(), await run.text()).toBe(201);
    const runId = ((await run.json()) as { id: number }).id;

    // 2. Engineer: the hand-off panel of revision 1; the run is offered; download works; send with a note.
    await eng.page.goto(`/handoff?array=${arrayId}&rev=1`);
    await eng.page.getByRole('heading', { name: `${arrayName}, revision 1` }).waitFor();
    await expect(
      eng.page.getByLabel(new RegExp(`Run ${runId} \\(esprit-tls, root-music\\)`)).isChecked(),
    ).resolves.toBe(true);
    const href = await eng.page.getByTestId('export-bundle').getAttribute('href');
    expect(href).toBe(`/api/v1/arrays/${arrayId}/bundle?revision=1&runs=${runId}`);
    const zip = await eng.page.request.get(href!);
    expect(zip.status()).toBe(200);
    expect(zip.headers()['content-type']).toBe('application/zip');
    await eng.page.getByLabel('Send to (e-mail)').fill('range-admin@steerwise.test');
    await eng.page.getByLabel('Note').fill('Two contacts at −12° and 21°. Please re-run on your side.');
    await eng.page.getByRole('button', { name: 'Send hand-off' }).click();
    await eng.page.getByRole('status').filter({ hasText: 'Sent to range-admin@steerwise.test' }).waitFor();
    await shot(eng.page, 'handoff-1-engineer-sent');
    await eng.context.close();

    // 3. Reviewer: approves revision 1; the sign-off shows name and time.
    const rev = await open();
    await signIn(rev.page, 'reviewer@steerwise.test', DEMO_PASSWORD);
    await rev.page.goto(`/handoff?array=${arrayId}&rev=1`);
    await rev.page.getByRole('button', { name: 'Approve and sign off' }).click();
    const signOff = rev.page.getByTestId('sign-off');
    await signOff.filter({ hasText: 'Signed off by Ilse Carrow (reviewer) on' }).waitFor();
    expect(await signOff.textContent()).toMatch(
      /Signed off by Ilse Carrow \(reviewer\) on \d{1,2} \w{3} \d{4}, \d{2}:\d{2} UTC/,
    );
    await rev.page.reload();
    await signOff.filter({ hasText: 'Signed off by Ilse Carrow' }).waitFor();
    await shot(rev.page, 'handoff-2-reviewer-signed-off');
    await rev.context.close();

    // 4. The colleague in the other team: the outbox holds the message; the link opens the import.
    const col = await open();
    await signIn(col.page, 'range-admin@steerwise.test', DEMO_PASSWORD);
    await col.page.goto('/outbox');
    await col.page
      .getByRole('button', { name: new RegExp(`Tobin Hartree sent you "${arrayName}" revision 1`) })
      .first()
      .click();
    const bodyText = (await col.page.getByTestId('outbox-body').textContent()) ?? '';
    expect(bodyText).toContain('Two contacts at −12° and 21°.');
    await shot(col.page, 'handoff-3-colleague-outbox');
    const importLink = col.page.getByTestId('outbox-body').getByRole('link', { name: /\/handoff\?link=/ });
    await importLink.click();
    await col.page.waitForURL((u) => u.pathname === '/handoff' && u.searchParams.has('link'));
    await col.page.getByRole('button', { name: 'Import the bundle from the link' }).click();
    const result = col.page.getByTestId('import-result');
    await result.waitFor({ timeout: 60_000 });
    await expect(result.getByText('reproduced', { exact: true }).count()).resolves.toBe(1);
    for (const method of ['esprit-tls', 'root-music']) {
      await expect(result.getByTestId(`diff-${method}`).textContent()).resolves.toMatch(/° \(reproduced\)$/);
    }
    expect(await result.textContent()).toContain('Signed off at the sender’s by Ilse Carrow');
    await shot(col.page, 'handoff-4-colleague-imported');

    // The download link itself works without a session; an altered one is refused with a clear page.
    const download = /(http:\/\/\S+\/api\/handoff\/\S+)/.exec(bodyText)![1];
    const fresh = await browser().newContext();
    const ok = await fresh.request.get(download);
    expect(ok.status()).toBe(200);
    const badPage = await fresh.newPage();
    await badPage.goto(download.slice(0, -3) + (download.endsWith('AAA') ? 'BBB' : 'AAA'));
    await badPage.getByRole('alert').filter({ hasText: 'This hand-off link is not valid' }).waitFor();
    await shot(badPage, 'handoff-5-altered-link');
    await fresh.close();

    // The imported array opens in the colleague's team.
    await result.getByRole('link', { name: 'Open the array' }).click();
    await col.page.waitForURL(/\/arrays\/\d+$/);
    // The array page carries the review and hand-off panels of the imported revision, with no sign-off yet.
    await col.page.getByTestId('sign-off').filter({ hasText: 'Revision 1 has no sign-off yet.' }).waitFor();
    await shot(col.page, 'handoff-6-colleague-array-page');
    await col.context.close();
  });
});
