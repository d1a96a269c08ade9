import { MembershipEntity } from './membership';
import { RefreshTokenEntity } from './refresh-token';
import { SiteEntity } from './site';
import { UserEntity } from './user';

export * from './membership';
export * from './refresh-token';
export * from './site';
export * from './user';

/** Every entity the DataSource knows; later features append theirs here. */
export const ENTITIES = [SiteEntity, UserEntity, MembershipEntity, RefreshTokenEntity];
