import { z } from 'zod';
import {
  inviteUserRequestSchema,
  updateUserRequestSchema,
  userIdParamsSchema,
  userListSchema,
  userSchema,
  ADMINS,
} from '@nightyard/contracts';
import type { AppDeps } from '../app-deps';
import type { ApiRoutes } from '../http/route';
import { inviteUser, listUsers, updateUser } from './users-service';

export function usersRoutes(api: ApiRoutes, { db, mailer, config, auth, clock, live }: AppDeps) {
  const invite = { inviteHours: config.INVITE_HOURS, publicUrl: auth.publicUrl };

  api.add(
    {
      method: 'get',
      path: '/users',
      summary: 'People of the organisation',
      tag: 'people',
      access: ADMINS,
      response: userListSchema,
    },
    async ({ user }) => ({ users: await listUsers(db, user) }),
  );

  api.add(
    {
      method: 'post',
      path: '/users/invite',
      summary: 'Invite someone by e-mail',
      tag: 'people',
      access: ADMINS,
      body: inviteUserRequestSchema,
      response: z.object({ user: userSchema }),
      status: 201,
      idempotent: true,
    },
    async ({ user, body }) => ({ user: await inviteUser(db, mailer, invite, user, body, clock()) }),
  );

  api.add(
    {
      method: 'patch',
      path: '/users/:id',
      summary: "Edit a person's name or roles, deactivate or reactivate",
      tag: 'people',
      access: ADMINS,
      params: userIdParamsSchema,
      body: updateUserRequestSchema,
      response: z.object({ user: userSchema }),
    },
    async ({ user, params, body }) => {
      const updated = await updateUser(db, user, params.id, body, clock());
      // What the person may see changed: their open live streams end and reconnect, checked anew.
      if (body.depotIds || body.roles || body.active === false) live.endStreamsOf(params.id);
      return { user: updated };
    },
  );
}
