export * from './errors';
export {
  ROLES,
  Role,
  Email,
  SignInRequest,
  SignInResponse,
  Membership,
  UserView,
  TokenPair,
  RefreshRequest,
  RefreshResponse,
  SignOutRequest,
  MeResponse,
} from './auth';
export * from './sites';
export * from './sync';
export * from './work-orders';
export * from './analysis';
