/**
 * Invitation and password reset through the e-mailed one-time links, read
 * from the admin Outbox page of the running app (its own SMTP sink). The
 * reset is done on the newly invited member: other browser-test files sign
 * in with the demo passwords, which must not change.
 */
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { alertIn, browserForFile, shot, signIn } from './browser';

const { baseUrl, open } = browserForFile();

async function linkFromOutbox(page: Page, subject: string, to: string, path: '/invite' | '/reset'): Promise<string> {
  await page.goto('/outbox');
  await page.getByPlaceholder('Filter by recipient or subject').fill(to);
  await page
    .getByRole('button', { name: new RegExp(subject) })
    .first()
    .click();
  const href = await page.getByTestId('outbox-body').locator(`a[href*="${path}?token="]`).first().getAttribute('href');
  expect(href).toBeTruthy();
  return href!;
}

describe('links by e-mail', () => {
  it('invitation: admin invites, the invitee joins through the link with the invited role', async () => {
    const admin = await open();
    const invitee = await open();
    try {
      await signIn(admin.page, 'admin@steerwise.test', DEMO_PASSWORD);
      await admin.page.goto('/team');
      await admin.page.getByLabel('E-mail').fill('tide.gauge@steerwise.test');
      await admin.page.getByLabel('Role', { exact: true }).selectOption('reviewer');
      await admin.page.getByRole('button', { name: 'Send invitation' }).click();
      await expect(admin.page.getByRole('status').textContent()).resolves.toContain(
        'Invitation sent to tide.gauge@steerwise.test',
      );
      await shot(admin.page, 'team-admin-after-invite');
      const link = await linkFromOutbox(admin.page, 'You are invited', 'tide.gauge@steerwise.test', '/invite');

      await invitee.page.goto(link);
      await expect(invitee.page.getByText('invited tide.gauge@steerwise.test as').textContent()).resolves.toContain(
        'reviewer',
      );
      await invitee.page.getByLabel('Your name').fill('Tamsin Gauge');
      await invitee.page.getByLabel('New password', { exact: true }).fill('slack water 1234');
      await invitee.page.getByLabel('New password again').fill('slack water 1234');
      await shot(invitee.page, 'invite-accept');
      await invitee.page.getByRole('button', { name: 'Join the team' }).click();
      await invitee.page.waitForURL((u) => u.pathname === '/login');
      await signIn(invitee.page, 'tide.gauge@steerwise.test', 'slack water 1234');
      await expect(invitee.page.getByTestId('current-role').textContent()).resolves.toBe('reviewer');
    } finally {
      await admin.context.close();
      await invitee.context.close();
    }
  });

  it('password reset (for the member invited above, so the demo accounts keep their passwords): request, read the link in the outbox, set a new password, sign in with it; the link then refuses', async () => {
    const anon = await open();
    const admin = await open();
    try {
      await anon.page.goto('/reset');
      await anon.page.getByLabel('E-mail').fill('tide.gauge@steerwise.test');
      await anon.page.getByRole('button', { name: 'Send reset link' }).click();
      await expect(anon.page.getByRole('status').textContent()).resolves.toContain('a reset link is on its way');

      await signIn(admin.page, 'admin@steerwise.test', DEMO_PASSWORD);
      const link = await linkFromOutbox(
        admin.page,
        'Reset your Steerwise password',
        'tide.gauge@steerwise.test',
        '/reset',
      );
      await shot(admin.page, 'outbox-reset-mail');
      expect(link.startsWith(`${baseUrl}/reset?token=`)).toBe(true);

      await anon.page.goto(link);
      await anon.page.getByLabel('New password', { exact: true }).fill('north breakwater 7');
      await anon.page.getByLabel('New password again').fill('north breakwater 7');
      await anon.page.getByRole('button', { name: 'Set new password' }).click();
      await anon.page.waitForURL((u) => u.pathname === '/login');
      await expect(anon.page.getByRole('status').textContent()).resolves.toContain('Your password is set');

      await signIn(anon.page, 'tide.gauge@steerwise.test', 'north breakwater 7');
      await expect(anon.page.getByTestId('current-role').textContent()).resolves.toBe('reviewer');

      // The used link is refused clearly.
      await anon.context.clearCookies();
      await anon.page.goto(link);
      await expect(alertIn(anon.page).textContent()).resolves.toContain('This link has already been used');
      await shot(anon.page, 'reset-link-used');
    } finally {
      await anon.context.close();
      await admin.context.close();
    }
  });

  it('an API token created on the account page works as a bearer credential', async () => {
    const { context, page } = await open();
    try {
      await signIn(page, 'viewer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/account');
      await page.getByLabel('Token name').fill('survey laptop');
      await page.getByRole('button', { name: 'Create token' }).click();
      const token = (await page.getByTestId('new-token').textContent())!.trim();
      await shot(page, 'account-token-created');
      const res = await fetch(`${baseUrl}/api/account`, { headers: { authorization: `Bearer ${token}` } });
      expect(res.status).toBe(200);
      expect((await res.json()).email).toBe('viewer@steerwise.test');
      const refused = await fetch(`${baseUrl}/api/audit`, { headers: { authorization: `Bearer ${token}` } });
      expect(refused.status).toBe(403);
    } finally {
      await context.close();
    }
  });
});
