/**
 * Review of an estimate run in the browser: the engineer starts a run, the
 * run page shows its review panel without a sign-off; the reviewer comments,
 * approves, and the sign-off (name and time) shows on the run page for
 * everyone, after a reload too; a viewer reads it without the form.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { browserForFile, csrf, shot, signIn } from './browser';

const { open } = browserForFile();

/** One source at 10° on a half-wavelength ULA of 6 elements plus small deterministic noise (N = 40 rows of M). */
function snapshots() {
  const m = 6;
  const n = 40;
  let state = 12345;
  const noise = () => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return (state / 2147483648 - 0.5) * 0.2;
  };
  const phase = Math.PI * Math.sin((10 * Math.PI) / 180);
  const re: number[][] = [];
  const im: number[][] = [];
  for (let t = 0; t < n; t++) {
    const s = 2 * Math.PI * 0.137 * t;
    re.push(Array.from({ length: m }, (_, k) => Math.cos(s + k * phase) + noise()));
    im.push(Array.from({ length: m }, (_, k) => Math.sin(s + k * phase) + noise()));
  }
  return { re, im };
}

describe('review of an estimate run', () => {
  it('a reviewer approves a run and the sign-off shows on the run page', async () => {
    const eng = await open();
    await signIn(eng.page, 'engineer@steerwise.test', DEMO_PASSWORD);
    const created = await eng.page.request.post('/api/v1/estimates', {
      headers: { 'x-csrf-token': await csrf(eng.page) },
      data: {
        snapshots: snapshots(),
        array: { elements: 6, spacingWavelengths: 0.5 },
        methods: ['esprit-ls'],
        sourceCount: 1,
      },
    });
    expect(created.status(), await created.text()).toBe(201);
    const runId = ((await created.json()) as { id: number }).id;
    for (let i = 0; i < 100; i++) {
      const status = ((await (await eng.page.request.get(`/api/v1/estimates/${runId}`)).json()) as { status: string })
        .status;
      if (status === 'done') break;
      expect(status).not.toBe('failed');
      await eng.page.waitForTimeout(200);
    }

    await eng.page.goto(`/estimates/${runId}`);
    await eng.page.getByRole('heading', { name: `Review of run #${runId}` }).waitFor();
    await eng.page
      .getByTestId('sign-off')
      .filter({ hasText: `Run ${runId} has no sign-off yet.` })
      .waitFor();
    // engineers comment but do not approve
    expect(await eng.page.getByRole('button', { name: 'Approve and sign off' }).count()).toBe(0);
    await eng.page.getByLabel('Reply with a comment').fill('One contact near 10°; please check.');
    await eng.page.getByRole('button', { name: 'Comment', exact: true }).click();
    await eng.page
      .getByRole('list', { name: 'Review thread' })
      .getByText('One contact near 10°; please check.')
      .waitFor();

    const rev = await open();
    await signIn(rev.page, 'reviewer@steerwise.test', DEMO_PASSWORD);
    await rev.page.goto(`/estimates/${runId}`);
    await rev.page
      .getByRole('list', { name: 'Review thread' })
      .getByText('One contact near 10°; please check.')
      .waitFor();
    await rev.page.getByLabel('Comment, or a note with your decision').fill('Bearing agrees with the bound.');
    await rev.page.getByRole('button', { name: 'Approve and sign off' }).click();
    const signOff = rev.page.getByTestId('sign-off');
    await signOff.filter({ hasText: 'Signed off by Ilse Carrow (reviewer) on' }).waitFor();
    expect(await signOff.textContent()).toMatch(
      /Signed off by Ilse Carrow \(reviewer\) on \d{1,2} \w{3} \d{4}, \d{2}:\d{2} UTC: “Bearing agrees with the bound.”/,
    );
    await rev.page.reload();
    await signOff.filter({ hasText: 'Signed off by Ilse Carrow (reviewer)' }).waitFor();
    await shot(rev.page, 'run-review-signed-off');
    await rev.context.close();

    // the API holds the same approval
    const thread = (await (await eng.page.request.get(`/api/v1/reviews?runId=${runId}`)).json()) as {
      status: string;
      signOffs: { by: string }[];
    };
    expect(thread.status).toBe('approved');
    expect(thread.signOffs.map((s) => s.by)).toEqual(['Ilse Carrow']);
    await eng.page.reload();
    await eng.page.getByTestId('sign-off').filter({ hasText: 'Signed off by Ilse Carrow (reviewer)' }).waitFor();
    await eng.context.close();

    const viewer = await open();
    await signIn(viewer.page, 'viewer@steerwise.test', DEMO_PASSWORD);
    await viewer.page.goto(`/estimates/${runId}`);
    await viewer.page.getByTestId('sign-off').filter({ hasText: 'Signed off by Ilse Carrow (reviewer)' }).waitFor();
    await viewer.page.getByText('Your role can read the review but not comment.').waitFor();
    await viewer.context.close();
  }, 120_000);
});
