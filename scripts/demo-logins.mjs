/** The demo logins, as the README lists them (kept in step with server/seed/demo-users.ts by a test). */
export const DEMO_PASSWORD = 'trueround-demo';
export const DEMO_LOGINS = [
  { email: 'tech@fernhallow.example', role: 'technician' },
  { email: 'planner@fernhallow.example', role: 'planner' },
  { email: 'engineer@fernhallow.example', role: 'engineer' },
  { email: 'admin@fernhallow.example', role: 'admin' },
];
export function demoLoginsText() {
  return [
    `Demo logins (password ${DEMO_PASSWORD}):`,
    ...DEMO_LOGINS.map((l) => `  ${l.role.padEnd(11)} ${l.email}`),
  ].join('\n');
}
