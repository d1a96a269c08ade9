/**
 * Wire schemas of site administration and the dev mailbox. Pure zod: the app's forms and the
 * server's handlers parse the same shapes.
 *
 *   POST /api/sites/:siteId/invitations {email, name, role}              admins → 201 InvitationResult
 *   POST /api/sites/:siteId/routes/:routeId/versions {template}          admins → 201 PublishVersionResponse
 *        400 validation: one detail per problem of the template, path `template.<path>` (checklists validateRoute)
 *   PATCH /api/sites/:siteId/instruments/:instrumentId                   admins → shared/api/instruments.ts
 *   GET  /api/dev/mailbox?siteId=&limit=                                 that site's admins, only with the mail fake → MailboxResponse (the site's mail only)
 */
import { z } from 'zod';
import { Email, Role } from './auth';

export const InvitationRequest = z.object({
  email: Email,
  name: z.string({ error: 'Required' }).trim().min(1, 'Must not be empty').max(200, 'Must be at most 200 characters'),
  role: Role,
});
export type InvitationRequest = z.input<typeof InvitationRequest>;

export const InvitationResult = z.object({
  userId: z.uuid(),
  email: z.string(),
  /** the name the admin typed: the site shows the person by it (an account of another site keeps its own name there) */
  name: z.string(),
  role: Role,
  /** the mail waits in mail_outbox (sent by the mail sender when SMTP is configured) */
  mailQueued: z.boolean(),
});
export type InvitationResult = z.infer<typeof InvitationResult>;

/** The template is checked by the server against the route's unit (checklists validateRoute); here only its presence. */
export const PublishVersionRequest = z.object({ template: z.unknown().refine((v) => v !== undefined, 'Required') });
export type PublishVersionRequest = z.infer<typeof PublishVersionRequest>;

export const PublishVersionResponse = z.object({
  id: z.uuid(),
  routeId: z.uuid(),
  /** the new version's number (the previous + 1) */
  number: z.number().int().min(1),
  publishedAt: z.iso.datetime(),
});
export type PublishVersionResponse = z.infer<typeof PublishVersionResponse>;

export const MailboxMessage = z.object({
  id: z.string(),
  receivedAt: z.iso.datetime(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  rawSize: z.number(),
});
export type MailboxMessage = z.infer<typeof MailboxMessage>;

export const MailboxResponse = z.object({ messages: z.array(MailboxMessage) });
export type MailboxResponse = z.infer<typeof MailboxResponse>;
