// One signed-in API client per demo role, keyed by role (the set-up of most API test files).
import { expect } from 'vitest';
import { DEMO_USERS } from '../helpers/testServer';
import { ApiClient } from './apiClient';

export async function signedIn(url: string): Promise<Record<string, ApiClient>> {
  const as: Record<string, ApiClient> = {};
  for (const u of DEMO_USERS) {
    const c = new ApiClient(url);
    expect((await c.signIn(u.email, u.password)).status).toBe(200);
    as[u.role] = c;
  }
  return as;
}
