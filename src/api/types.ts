// Response and request shapes of the API, taken from the zod schemas in ./shared.
import type { AppRule } from '../../shared/abilities';
import type { SessionUser, User, CreateUserBody, UpdateUserBody } from '../../shared/schemas/users';
import type { InvitationResponse } from '../../shared/schemas/auth';

export type { SessionUser };

export type SessionInfo = {
  user: SessionUser;
  rules: AppRule[];
  csrfToken?: string;
};

export type UserRecord = User;
export type NewUserInput = CreateUserBody;
export type UserPatch = Partial<UpdateUserBody>;
export type InvitationInfo = InvitationResponse;
