/**
 * Every demo role signs in through the real sign-in page of the built app
 * and sees what it may see; refused roles get a clear message. Screenshots
 * land in test-results/.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { alertIn, browserForFile, shot, signIn } from './browser';

const { open } = browserForFile();

const roles = [
  { role: 'admin', email: 'admin@steerwise.test', name: 'Maren Aldous', admin: true, canManage: true },
  { role: 'engineer', email: 'engineer@steerwise.test', name: 'Tobin Hartree', admin: false, canManage: false },
  { role: 'reviewer', email: 'reviewer@steerwise.test', name: 'Ilse Carrow', admin: false, canManage: false },
  { role: 'viewer', email: 'viewer@steerwise.test', name: 'Ruari Penhale', admin: false, canManage: false },
] as const;

describe('each role signs in and sees its pages', () => {
  for (const r of roles) {
    it(`${r.role}`, async () => {
      const { context, page } = await open();
      try {
        await signIn(page, r.email, DEMO_PASSWORD);
        await expect(page.getByTestId('current-role').textContent()).resolves.toBe(r.role);
        await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toBe(
          `Good to see you, ${r.name.split(' ')[0]}`,
        );
        await expect(page.getByText('Estimates are advisory.').isVisible()).resolves.toBe(true);
        const nav = page.getByRole('navigation', { name: 'Main' });
        for (const label of ['Arrays', 'Datasets', 'Estimates', 'Studies', 'Team', 'Account']) {
          expect(await nav.getByRole('link', { name: new RegExp(`^${label}`) }).count(), label).toBe(1);
        }
        expect(await nav.getByRole('link', { name: /^Outbox/ }).count()).toBe(r.admin ? 1 : 0);
        expect(await nav.getByRole('link', { name: /^Audit log/ }).count()).toBe(r.admin ? 1 : 0);
        await shot(page, `role-${r.role}-overview`);

        // Every role reads the team's arrays (the demo seed adds two).
        await page.goto('/arrays');
        await page.getByRole('table', { name: 'Arrays' }).waitFor();

        // Audit log: admins read it; everyone else gets a clear refusal, not a blank page.
        await page.goto('/audit');
        if (r.admin) {
          await page.getByRole('table', { name: 'Audit events' }).waitFor();
          expect(await page.getByRole('cell', { name: 'signin.succeeded' }).count()).toBeGreaterThan(0);
        } else {
          const alert = alertIn(page);
          await expect(alert.textContent()).resolves.toContain(`Your role (${r.role}) cannot read the audit log.`);
          expect(await page.getByRole('table', { name: 'Audit events' }).count()).toBe(0);
        }
        await shot(page, `role-${r.role}-audit`);

        await page.goto('/outbox');
        if (!r.admin)
          await expect(alertIn(page).textContent()).resolves.toContain(`Your role (${r.role}) cannot read the outbox.`);

        // Team: everyone sees members; only admins get the invitation form.
        await page.goto('/team');
        await page.getByRole('table', { name: 'Team members' }).waitFor();
        expect(await page.getByRole('button', { name: 'Send invitation' }).count()).toBe(r.canManage ? 1 : 0);
        if (!r.canManage)
          await expect(page.getByRole('note').textContent()).resolves.toContain(
            `Your role (${r.role}) cannot manage team members and invitations.`,
          );
        await shot(page, `role-${r.role}-team`);
      } finally {
        await context.close();
      }
    });
  }
});

describe('sign-in refusals in the browser', () => {
  it('a wrong password shows a clear message and stays on the sign-in page', async () => {
    const { context, page } = await open();
    try {
      await page.goto('/login');
      await page.getByLabel('E-mail').fill('engineer@steerwise.test');
      await page.getByLabel('Password').fill('definitely wrong');
      await page.getByRole('button', { name: 'Sign in' }).click();
      await expect(alertIn(page).textContent()).resolves.toContain('That e-mail and password do not match an account');
      expect(new URL(page.url()).pathname).toBe('/login');
    } finally {
      await context.close();
    }
  });

  it('after five failures the form says to wait (rate limit)', async () => {
    const { context, page } = await open();
    try {
      await page.goto('/login');
      await page.getByLabel('E-mail').fill('locked-out@steerwise.test');
      for (let i = 0; i < 6; i++) {
        await page.getByLabel('Password').fill(`guess number ${i}`);
        await page.getByRole('button', { name: 'Sign in' }).click();
        await alertIn(page).waitFor();
        await page.getByRole('button', { name: 'Sign in' }).and(page.locator(':not([disabled])')).waitFor();
      }
      await expect(alertIn(page).textContent()).resolves.toMatch(
        /Too many failed sign-in attempts\. Wait \d+ minutes?/,
      );
      await shot(page, 'sign-in-rate-limited');
    } finally {
      await context.close();
    }
  });

  it('signing out ends the session: app pages send you back to sign in', async () => {
    const { context, page } = await open();
    try {
      await signIn(page, 'viewer@steerwise.test', DEMO_PASSWORD);
      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL((u) => u.pathname === '/login');
      await page.goto('/account');
      expect(new URL(page.url()).pathname).toBe('/login');
      const res = await page.request.get('/api/account');
      expect(res.status()).toBe(401);
    } finally {
      await context.close();
    }
  });

  it('a signed-out visitor of an app page is sent to sign in', async () => {
    const { context, page } = await open();
    try {
      await page.goto('/team');
      expect(new URL(page.url()).pathname).toBe('/login');
      await shot(page, 'login');
    } finally {
      await context.close();
    }
  });

  it('keyboard: the first Tab reaches the skip link, which moves focus to the content', async () => {
    const { context, page } = await open();
    try {
      await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/team');
      await page.keyboard.press('Tab');
      await expect(page.evaluate(() => document.activeElement?.textContent?.trim())).resolves.toBe('Skip to content');
      await shot(page, 'keyboard-skip-link');
      await page.keyboard.press('Enter');
      await expect(page.evaluate(() => location.hash)).resolves.toBe('#main');
      // Sorting the members table works from the keyboard too.
      const nameHeader = page.getByRole('columnheader', { name: /Name/ });
      await expect(nameHeader.getAttribute('aria-sort')).resolves.toBe('ascending');
      await nameHeader.getByRole('button').focus();
      await page.keyboard.press('Enter');
      await expect(nameHeader.getAttribute('aria-sort')).resolves.toBe('descending');
    } finally {
      await context.close();
    }
  });

  it('on a phone-sized screen the navigation folds into a menu button', async () => {
    const { context, page } = await open({ width: 390, height: 844 });
    try {
      await signIn(page, 'reviewer@steerwise.test', DEMO_PASSWORD);
      const menu = page.getByRole('button', { name: 'Menu' });
      await menu.click();
      await expect(
        page
          .locator('#mobile-nav')
          .getByRole('link', { name: /^Datasets/ })
          .isVisible(),
      ).resolves.toBe(true);
      await shot(page, 'mobile-reviewer-menu');
    } finally {
      await context.close();
    }
  });
});
