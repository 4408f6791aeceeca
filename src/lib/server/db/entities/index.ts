import { UserSchema } from './user';

/** Every entity the ORM knows; migrations are generated from this list. */
export const entities = [UserSchema];

export { UserSchema, ROLES, type Role, type User } from './user';
