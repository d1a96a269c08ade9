export { requireAuth, requireSiteRole, authOf, siteOf } from './middleware';
export { hashPassword, verifyPassword } from './passwords';
export { signAccessToken, verifyAccessToken, hashRefreshToken, JWT_ISSUER, JWT_AUDIENCE } from './tokens';
