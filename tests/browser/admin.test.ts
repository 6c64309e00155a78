// Admin work through the UI: invite a user, the invitee sets a password from the e-mailed link
// and signs in, the admin changes their role and deactivates them; and the sign-in refusal is
// the same uniform message for a wrong password, an unknown e-mail and a deactivated account
// (issue 2: "a uniform error that does not reveal whether the e-mail exists").
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { defineAbilityFor } from '../../shared/abilities';
import { AREAS } from '../../src/auth/areas';
import {
  browserSuite,
  demoCredentials,
  isVisible,
  navLabels,
  newContext,
  screenshot,
  signIn,
  signInAs,
  waitForHeading,
  watchPageErrors,
} from './harness';

const suite = browserSuite();

/** The invitation link's token from the newest e-mail to `address` caught by the test server's SMTP fake. */
async function invitationTokenFor(address: string): Promise<string> {
  const mail = await suite.server.mail.waitFor(address, 10_000);
  const match = /\/invite\/([A-Za-z0-9_-]{20,100})/.exec(mail.text);
  if (!match) throw new Error(`The e-mail to ${address} has no /invite/<token> link:\n${mail.text}`);
  return match[1];
}

/** The visible refusal on the sign-in page after a failed attempt. */
async function signInError(page: Page): Promise<string> {
  const alert = page.getByRole('alert');
  await alert.waitFor({ state: 'visible' });
  return ((await alert.textContent()) ?? '').trim();
}

function row(page: Page, email: string) {
  return page.getByTestId(`user-row-${email}`);
}

describe('admin users', () => {
  const invitee = { name: 'Oskar Fenwyck', email: 'oskar.fenwyck@hspdo.example', password: 'quiet-harbour-lantern-42' };

  it('invites a user, who sets a password and signs in; then changes their role and deactivates them', async () => {
    const adminCtx = await newContext(suite.browser, suite.server.url);
    const admin = await adminCtx.newPage();
    const adminErrors = watchPageErrors(admin);
    const creds = demoCredentials('admin');
    await signInAs(admin, 'admin');

    // From home, the "Invite a colleague" task leads to the form.
    await admin.getByRole('link', { name: /Invite a colleague/ }).click();
    expect(await waitForHeading(admin, 'Users')).toBe('Users');
    const form = admin.locator('#new-user');
    await form.getByLabel('Full name').fill(invitee.name);
    await form.getByLabel('E-mail address').fill(invitee.email);
    await form.getByLabel('Role').selectOption({ label: 'Analyst' });
    await form.getByRole('button', { name: 'Send invitation' }).click();
    await form.getByText(`Invitation sent to ${invitee.email}`).waitFor();
    expect(await isVisible(row(admin, invitee.email))).toBe(true);
    expect((await row(admin, invitee.email).getByTestId('role').textContent())?.trim()).toBe('Analyst');
    expect(await row(admin, invitee.email).getByText('Invited', { exact: true }).count()).toBe(1);

    // The invitee opens the link from the e-mail in their own browser context.
    const token = await invitationTokenFor(invitee.email);
    const userCtx = await newContext(suite.browser, suite.server.url);
    const user = await userCtx.newPage();
    const userErrors = watchPageErrors(user);
    await user.goto(`/invite/${token}`);
    await user.getByText(`Welcome, ${invitee.name}`).waitFor();
    await screenshot(user, 'invite-set-password');
    // Too short a password is refused in the form (the API requires at least 12 characters).
    await user.getByLabel('Password', { exact: true }).fill('short');
    await user.getByLabel('Repeat the password').fill('short');
    await user.getByRole('button', { name: 'Set password' }).click();
    expect(await isVisible(user.getByText('Use at least 12 characters'))).toBe(true);
    await user.getByLabel('Password', { exact: true }).fill(invitee.password);
    await user.getByLabel('Repeat the password').fill(invitee.password);
    await user.getByRole('button', { name: 'Set password' }).click();
    await user.getByText('Your password is set').waitFor();
    await screenshot(user, 'invite-done');
    await user.getByRole('link', { name: 'Go to sign-in' }).click();
    await user.waitForURL('**/sign-in?email=*');
    expect(await user.getByLabel('E-mail address').inputValue()).toBe(invitee.email);
    await user.getByLabel('Password', { exact: true }).fill(invitee.password);
    await user.getByRole('button', { name: 'Sign in' }).click();
    await user.waitForURL((u) => u.pathname === '/');
    // an analyst's areas, as the one ability definition allows them (roles.test.ts spells them out per role)
    const analystAbility = defineAbilityFor({ id: 1, role: 'analyst' });
    expect(await navLabels(user)).toEqual(['Home', ...AREAS.filter((a) => analystAbility.can(a.action, a.subject)).map((a) => a.label)]);
    expect(await user.getByTestId('current-user').textContent()).toContain('Analyst');

    // The used link cannot be used again.
    const reuseCtx = await newContext(suite.browser, suite.server.url);
    const reuse = await reuseCtx.newPage();
    await reuse.goto(`/invite/${token}`);
    expect(await isVisible(reuse.getByText('This invitation link cannot be used'))).toBe(true);
    await reuseCtx.close();

    // Admin changes the role, through the confirmation dialog.
    await admin.reload();
    await row(admin, invitee.email).getByText('Active', { exact: true }).waitFor();
    await admin.getByRole('button', { name: `Change role of ${invitee.name}` }).click();
    const roleDialog = admin.getByRole('dialog', { name: `Change the role of ${invitee.name}` });
    await roleDialog.waitFor();
    await roleDialog.getByLabel('New role').selectOption({ label: 'Reviewer' });
    await screenshot(admin, 'admin-change-role-dialog');
    await roleDialog.getByRole('button', { name: 'Change role' }).click();
    await roleDialog.waitFor({ state: 'hidden' });
    await admin.getByText(`${invitee.name} is now Reviewer.`).waitFor();
    expect((await row(admin, invitee.email).getByTestId('role').textContent())?.trim()).toBe('Reviewer');
    // The server agrees, and the invitee's own session shows the new role on the next request.
    const listed = (await (await admin.request.get('/api/users')).json()) as { users: Array<{ email: string; role: string }> };
    expect(listed.users.find((u) => u.email === invitee.email)?.role).toBe('reviewer');
    await user.reload();
    await user.getByTestId('current-user').getByText('Reviewer').waitFor();

    // Cancelling a deactivation changes nothing.
    await admin.getByRole('button', { name: `Deactivate ${invitee.name}` }).click();
    const deactivateDialog = admin.getByRole('dialog', { name: `Deactivate ${invitee.name}?` });
    await deactivateDialog.getByRole('button', { name: 'Cancel' }).click();
    await deactivateDialog.waitFor({ state: 'hidden' });
    expect(await row(admin, invitee.email).getByText('Active', { exact: true }).count()).toBe(1);

    // Deactivation, confirmed: the invitee's session ends at once and they cannot sign in.
    await admin.getByRole('button', { name: `Deactivate ${invitee.name}` }).click();
    await deactivateDialog.getByRole('button', { name: 'Deactivate' }).click();
    await deactivateDialog.waitFor({ state: 'hidden' });
    await row(admin, invitee.email).getByText('Deactivated', { exact: true }).waitFor();
    await screenshot(admin, 'admin-users-after-deactivation');
    expect((await user.request.get('/api/session')).status()).toBe(401);
    await user.reload();
    await user.waitForURL('**/sign-in');
    await signIn(user, invitee.email, invitee.password);
    const refusal = await signInError(user);
    expect(refusal.length).toBeGreaterThan(0);

    // The refusal is word for word the one a wrong password gets.
    const probeCtx = await newContext(suite.browser, suite.server.url);
    const probe = await probeCtx.newPage();
    await signIn(probe, creds.email, 'not-the-right-password');
    expect(await signInError(probe)).toBe(refusal);
    await probeCtx.close();

    // Reactivation lets them in again.
    await admin.getByRole('button', { name: `Reactivate ${invitee.name}` }).click();
    await admin.getByRole('dialog', { name: `Reactivate ${invitee.name}?` }).getByRole('button', { name: 'Reactivate' }).click();
    await row(admin, invitee.email).getByText('Active', { exact: true }).waitFor();
    await signIn(user, invitee.email, invitee.password);
    await user.waitForURL((u) => u.pathname === '/');

    expect(adminErrors).toEqual([]);
    expect(userErrors).toEqual([]);
    await userCtx.close();
    await adminCtx.close();
  });
});

describe('sign-in refusal', () => {
  it('shows the same uniform error for a wrong password and for an unknown e-mail, and stays on sign-in', async () => {
    const context = await newContext(suite.browser, suite.server.url);
    const page = await context.newPage();
    const errors = watchPageErrors(page);

    await signIn(page, demoCredentials('analyst').email, 'tocsin-wrong-password');
    const wrongPassword = await signInError(page);
    expect(wrongPassword).not.toBe('');
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    // The message must not say which of the two was wrong.
    expect(wrongPassword.toLowerCase()).not.toMatch(/no (such )?(user|account)|unknown e-?mail|not registered|wrong password/);
    await screenshot(page, 'sign-in-wrong-password');

    await signIn(page, 'nobody-here@hspdo.example', 'tocsin-wrong-password');
    expect(await signInError(page)).toBe(wrongPassword);

    // Nothing was signed in.
    expect((await page.request.get('/api/session')).status()).toBe(401);
    expect(errors).toEqual([]);
    await context.close();
  });
});

describe('account', () => {
  it('changes the own password: refuses a wrong current password and a mismatch, then the new one works', async () => {
    const context = await newContext(suite.browser, suite.server.url);
    const page = await context.newPage();
    const errors = watchPageErrors(page, [401, 422]); // 422: the wrong current password, on purpose
    const { email, password } = demoCredentials('liaison');
    const newPassword = 'grey-gull-over-the-sound-7';
    await signInAs(page, 'liaison');
    await page.getByRole('link', { name: /Change your password/ }).click();
    expect(await waitForHeading(page, 'Your account')).toBe('Your account');

    const current = page.getByLabel('Current password');
    const fresh = page.getByLabel('New password', { exact: true });
    const repeat = page.getByLabel('Repeat the new password');
    const submit = page.getByRole('button', { name: 'Change password' });

    // Mismatch is caught in the form.
    await current.fill(password);
    await fresh.fill(newPassword);
    await repeat.fill(newPassword + 'x');
    await submit.click();
    expect(await isVisible(page.getByText('The two new passwords differ'))).toBe(true);
    expect(await repeat.getAttribute('aria-invalid')).toBe('true');

    // A wrong current password is refused by the server and shown at that field.
    await current.fill('not-my-password-at-all');
    await repeat.fill(newPassword);
    await submit.click();
    await page.getByText('The current password is not correct').waitFor();
    expect(await current.getAttribute('aria-invalid')).toBe('true');
    await screenshot(page, 'account-wrong-current-password');

    await current.fill(password);
    await submit.click();
    await page.getByText('Your password has been changed.').waitFor();

    // The old password no longer signs in; the new one does.
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL((u) => u.pathname === '/sign-in');
    await signIn(page, email, password);
    expect(await signInError(page)).not.toBe('');
    await signIn(page, email, newPassword);
    await page.waitForURL((u) => u.pathname === '/');
    expect(errors).toEqual([]);
    await context.close();
  });
});

describe('error states', () => {
  it('shows a failed user list with the server message and recovers with "Try again"', async () => {
    const context = await newContext(suite.browser, suite.server.url);
    const page = await context.newPage();
    await signInAs(page, 'admin');
    // GET /api/users fails with the uniform error body (through the client's own retries) until
    // the test lets requests through again.
    let failing = true;
    await page.route('**/api/users', async (route) => {
      if (route.request().method() === 'GET' && failing) {
        await route.fulfill({
          status: 503,
          contentType: 'application/json',
          body: JSON.stringify({ error: { code: 'internal', message: 'The user list is unavailable right now' } }),
        });
      } else {
        await route.continue();
      }
    });
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Users', exact: true }).click();
    const alert = page.getByRole('alert');
    await alert.waitFor();
    expect(await alert.textContent()).toContain('The user list is unavailable right now');
    await screenshot(page, 'admin-users-error');
    failing = false;
    await alert.getByRole('button', { name: 'Try again' }).click();
    expect(await isVisible(row(page, 'analyst@hspdo.example'))).toBe(true);
    expect(await page.getByRole('alert').count()).toBe(0);
    await context.close();
  });

  it('says so when the server cannot be reached at sign-in', async () => {
    const context = await newContext(suite.browser, suite.server.url);
    const page = await context.newPage();
    await page.goto('/sign-in');
    await waitForHeading(page, 'Sign in to Tocsin');
    await page.route('**/api/session', (route) => route.abort('connectionrefused'));
    await page.getByLabel('E-mail address').fill('analyst@hspdo.example');
    await page.getByLabel('Password', { exact: true }).fill('tocsin-analyst-demo');
    await page.getByRole('button', { name: 'Sign in' }).click();
    expect(await signInError(page)).toBe('Tocsin could not reach the server. Check your connection and try again.');
    await context.close();
  });
});
