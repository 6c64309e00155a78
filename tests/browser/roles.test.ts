// Each demo role signs in through the real UI, sees exactly its own navigation, visits home
// and the admin users page, and signs out.
// Expected areas come from issue 2 ("Admin screens to create and invite users, assign roles,
// deactivate"; "an account page (change password)" for every signed-in user), written out here
// per role, and are also cross-checked against the one ability definition in shared/abilities.ts.
import { describe, expect, it } from 'vitest';
import { defineAbilityFor } from '../../shared/abilities';
import { AREAS } from '../../src/auth/areas';
import {
  browserSuite,
  DEMO_ROLES,
  isVisible,
  navLabels,
  newContext,
  screenshot,
  signedInPage,
  signInAs,
  signOut,
  waitForHeading,
  watchPageErrors,
} from './harness';

const EXPECTED_NAV: Record<(typeof DEMO_ROLES)[number], string[]> = {
  admin: ['Home', 'Objects', 'Observatories', 'Bulletins', 'Releases', 'Users', 'Account'],
  analyst: ['Home', 'Objects', 'Observatories', 'Bulletins', 'Releases', 'Account'],
  reviewer: ['Home', 'Objects', 'Observatories', 'Bulletins', 'Releases', 'Account'],
  communications: ['Home', 'Bulletins', 'Releases', 'Account'],
  liaison: ['Home', 'Releases', 'Briefings', 'Account'],
};

const AREA_PAGES: Record<string, { path: string; heading: RegExp }> = {
  Home: { path: '/', heading: /^Good to see you, \S+$/ },
  Users: { path: '/admin/users', heading: /^Users$/ },
  Objects: { path: '/objects', heading: /^Objects$/ },
  Observatories: { path: '/observatories', heading: /^Observatories$/ },
  Bulletins: { path: '/bulletins', heading: /^Bulletins$/ },
  Releases: { path: '/releases', heading: /^Releases$/ },
  Briefings: { path: '/briefings', heading: /^Briefings$/ },
  Account: { path: '/account', heading: /^Your account$/ },
};

const CAUTION =
  "Tocsin's numbers are analysis aids; official impact-risk statements come from the responsible national and international authorities.";

const suite = browserSuite();

describe('signed out', () => {
  it('sends a visitor to the sign-in page and shows the caution', async () => {
    const context = await newContext(suite.browser, suite.server.url);
    const page = await context.newPage();
    const errors = watchPageErrors(page);
    await page.goto('/admin/users');
    await page.waitForURL(/\/sign-in\?next=%2Fadmin%2Fusers$/);
    expect(await waitForHeading(page, 'Sign in to Tocsin')).toBe('Sign in to Tocsin');
    expect(await page.getByRole('navigation', { name: 'Main' }).count()).toBe(0);
    expect((await page.getByTestId('caution').textContent())?.trim()).toBe(CAUTION);
    await screenshot(page, 'signed-out-sign-in');
    expect(errors).toEqual([]);
    await context.close();
  });

  it('shows the 404 page for an unknown address', async () => {
    const context = await newContext(suite.browser, suite.server.url);
    const page = await context.newPage();
    await page.goto('/no/such/page');
    expect(await waitForHeading(page, 'Page not found')).toBe('Page not found');
    await context.close();
  });
});

describe.each(DEMO_ROLES)('role %s', (role) => {
  it('signs in, sees exactly its areas, visits home and users, signs out', async () => {
    const { context, page, errors } = await signedInPage(suite.browser, suite.server.url, role);
    expect(await waitForHeading(page, /^Good to see you/)).toMatch(/^Good to see you/);

    // Navigation: exactly the expected areas, and the same as the shared ability allows.
    const nav = await navLabels(page);
    expect(nav).toEqual(EXPECTED_NAV[role]);
    const ability = defineAbilityFor({ id: 1, role });
    expect(nav).toEqual(['Home', ...AREAS.filter((a) => ability.can(a.action, a.subject)).map((a) => a.label)]);

    // Home lists what the user can do now, as links; everyone can change their password.
    const tasks = page.getByTestId('tasks').getByRole('link');
    const taskTitles = await tasks.allTextContents();
    expect(taskTitles.some((t) => t.startsWith('Change your password'))).toBe(true);
    expect(taskTitles.some((t) => t.startsWith('Invite a colleague'))).toBe(role === 'admin');
    expect((await page.getByTestId('caution').textContent())?.trim()).toBe(CAUTION);
    await screenshot(page, `${role}-home`);

    // Every nav link leads to its page (checked by address and main heading).
    for (const label of [...nav].reverse()) {
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: label, exact: true }).click();
      const target = AREA_PAGES[label];
      if (!target) throw new Error(`Navigation shows "${label}", which AREA_PAGES in this test does not know: add its path and heading`);
      const { path, heading } = target;
      await page.waitForURL((u) => u.pathname === path);
      expect(await waitForHeading(page, heading)).toMatch(heading);
    }

    // The admin users page: the list for admin, a refusal for everyone else.
    await page.goto('/admin/users');
    if (role === 'admin') {
      expect(await waitForHeading(page, 'Users')).toBe('Users');
      for (const r of DEMO_ROLES) expect(await isVisible(page.getByTestId(`user-row-${r}@hspdo.example`))).toBe(true);
    } else {
      expect(await waitForHeading(page, 'Not available to your role')).toBe('Not available to your role');
      expect(await page.getByRole('table').count()).toBe(0);
    }
    await screenshot(page, `${role}-admin-users`);

    await signOut(page);
    expect(await waitForHeading(page, 'Sign in to Tocsin')).toBe('Sign in to Tocsin');
    // Signed out for real: the server no longer knows the session.
    const res = await page.request.get('/api/session');
    expect(res.status()).toBe(401);
    await page.goto('/');
    await page.waitForURL('**/sign-in');

    expect(errors).toEqual([]);
    await context.close();
  });
});

describe('small screen', () => {
  it('hides the navigation behind a menu button that reveals the same areas', async () => {
    const context = await newContext(suite.browser, suite.server.url, { width: 390, height: 844 });
    const page = await context.newPage();
    await signInAs(page, 'admin');
    const menu = page.getByRole('button', { name: 'Menu' });
    expect(await menu.getAttribute('aria-expanded')).toBe('false');
    expect(await page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(false);
    await screenshot(page, 'admin-home-phone');
    await menu.click();
    expect(await page.getByRole('button', { name: 'Close menu' }).getAttribute('aria-expanded')).toBe('true');
    expect(await navLabels(page)).toEqual(EXPECTED_NAV.admin);
    await screenshot(page, 'admin-home-phone-menu');
    // Following a link closes the menu again.
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Users', exact: true }).click();
    expect(await waitForHeading(page, 'Users')).toBe('Users');
    expect(await page.getByRole('button', { name: 'Menu' }).getAttribute('aria-expanded')).toBe('false');
    await screenshot(page, 'admin-users-phone');
    await context.close();
  });

  it('offers a skip link as the first thing a keyboard user reaches', async () => {
    const context = await newContext(suite.browser, suite.server.url);
    const page = await context.newPage();
    await page.goto('/sign-in');
    await waitForHeading(page, 'Sign in to Tocsin');
    await page.keyboard.press('Tab');
    const focused = page.locator(':focus');
    expect((await focused.textContent())?.trim()).toBe('Skip to content');
    expect(await focused.isVisible()).toBe(true);
    await page.keyboard.press('Enter');
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('main');
    await context.close();
  });
});
