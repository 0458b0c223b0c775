import { describe, expect, it } from 'vitest';
import { mainNav, teamNav } from '@/components/shell/nav-rail';

// The rail's subtitles describe what each area does; a copied subtitle sends people to the wrong page.
describe('navigation rail subtitles', () => {
  const hint = (label: string) => mainNav.find((i) => i.label === label)?.hint ?? '';

  it('gives every entry its own subtitle', () => {
    const hints = [...mainNav, ...teamNav].map((i) => i.hint);
    expect(new Set(hints).size).toBe(hints.length);
  });

  it('describes Studies as Monte Carlo accuracy against the Cramér–Rao bound', () => {
    expect(hint('Studies')).toMatch(/Monte Carlo/);
    expect(hint('Studies')).toMatch(/CRB|Cramér–Rao/);
    expect(hint('Studies')).not.toMatch(/hand-off|review/i);
  });

  it('describes Hand-off as bundles, e-mail and sign-off', () => {
    expect(hint('Hand-off')).toMatch(/bundle/i);
    expect(hint('Hand-off')).toMatch(/e-mail/i);
    expect(hint('Hand-off')).toMatch(/sign-off/i);
  });
});
