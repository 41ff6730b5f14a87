import type { Role } from '@nightyard/contracts';

/** The caller of a request, loaded fresh from the database for each request (or from KnownUsers). */
export interface AuthUser {
  id: string;
  organisationId: string;
  email: string;
  name: string;
  roles: Role[];
  /**
   * The depots assigned to the caller (read with the user, in the same query). Whether the caller
   * may see a depot is decided in one place: `mayOpenDepot` (apps/api/src/depots/depot-access.ts).
   */
  depotIds: string[];
}
