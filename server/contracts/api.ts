/**
 * HTTP API contracts: request bodies, params, queries and response shapes.
 * Imported by the server (parsing) and by the app (typing and form errors).
 * Only zod may be imported here.
 */
import { z } from 'zod';
import { capabilities, projectRoleSchema, siteRoleSchema } from './roles';
import { designInputSchema, designSchema, siteSchema } from './design';

// ---------- errors ----------
export const errorCodeSchema = z.enum([
  'bad_request',
  'validation_failed',
  'unauthenticated',
  'forbidden',
  'not_found',
  'conflict',
  'stale_write',
  'rate_limited',
  'csrf_failed',
  'unprocessable',
  'payload_too_large',
  /** the database is out of reach (restarting, down): try again shortly; nothing was written */
  'unavailable',
  'internal',
]);
export type ErrorCode = z.infer<typeof errorCodeSchema>;

export const fieldIssueSchema = z.object({ path: z.array(z.union([z.string(), z.number()])), message: z.string() });
export const errorBodySchema = z.object({
  error: z.object({
    code: errorCodeSchema,
    message: z.string(),
    details: z.array(fieldIssueSchema).optional(),
    /** on a 409 `stale_write` of a design: who saved the version that is now current, and when */
    current: z.object({ version: z.number().int(), updatedAt: z.string(), updatedBy: z.string().nullable() }).optional(),
  }),
});
export type ErrorBody = z.infer<typeof errorBodySchema>;

// ---------- shared ----------
/** Largest PostgreSQL `integer` (2^31 − 1): ids and versions are stored in that type. */
export const PG_INT_MAX = 2_147_483_647;
/**
 * A row id from a URL segment, a query string or a JSON body. Strings must be plain decimal digits:
 * `z.coerce` (Number()) would also read `0x10`, `9.0`, `1e1` or ` 7` as ids, so one resource would have many
 * addresses. JSON numbers stay numbers (a JSON `9.0` is the number 9 by the JSON grammar).
 */
export const decimalIntSchema = z
  .union([z.number(), z.string().regex(/^(0|[1-9][0-9]{0,15})$/, 'Use a whole number written in decimal digits, like 12.').transform(Number)])
  .pipe(z.number().int());
export const idSchema = decimalIntSchema.pipe(z.number().positive().max(PG_INT_MAX));
export const emailSchema = z.string().trim().toLowerCase().email().max(254);
export const passwordSchema = z.string().min(10, 'Use at least 10 characters.').max(200);
export const displayNameSchema = z.string().trim().min(1).max(80);
export const versionSchema = z.number().int().min(1).max(PG_INT_MAX);

export const userSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  displayName: z.string(),
  siteRole: siteRoleSchema,
  version: z.number().int(),
});
export type User = z.infer<typeof userSchema>;

/** Answer of requests that only need to say "done" (e.g. a password-reset request, which never says whether the account exists). */
export const okResponseSchema = z.object({ ok: z.literal(true) });

// ---------- health ----------
export const healthSchema = z.object({ ok: z.boolean(), database: z.enum(['up', 'down']) });

// ---------- auth ----------
export const csrfResponseSchema = z.object({ csrfToken: z.string() });
export const signUpBodySchema = z.object({ email: emailSchema, password: passwordSchema, displayName: displayNameSchema });
/**
 * Answer to a sign-up: the same for a new address and for one that already has an account
 * (the e-mail sent tells the owner of the address which it was), so it reveals nothing.
 */
export const signUpResponseSchema = z.object({ status: z.literal('check-email') });
export type SignUpResponse = z.infer<typeof signUpResponseSchema>;
/** The token from the `/verify/<token>` link of the confirmation e-mail. */
export const verifyEmailBodySchema = z.object({ token: z.string().min(16).max(200) });
export const signInBodySchema = z.object({ email: emailSchema, password: z.string().min(1).max(200) });
export const meResponseSchema = z.object({ user: userSchema });
export const resetRequestBodySchema = z.object({ email: emailSchema });
export const resetConfirmBodySchema = z.object({ token: z.string().min(16).max(200), password: passwordSchema });

// ---------- account ----------
export const accountUpdateBodySchema = z.object({ displayName: displayNameSchema, version: versionSchema });
export const passwordChangeBodySchema = z.object({ currentPassword: z.string().min(1).max(200), newPassword: passwordSchema });

// ---------- projects ----------
export const projectParamsSchema = z.object({ projectId: idSchema });
export const projectSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  description: z.string(),
  role: projectRoleSchema,
  capabilities: z.array(z.enum(capabilities)),
  version: z.number().int(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type Project = z.infer<typeof projectSchema>;
export const projectListSchema = z.object({ projects: z.array(projectSchema) });
export const projectCreateBodySchema = z.object({
  name: z.string().trim().min(1).max(120),
  description: z.string().trim().max(2000).default(''),
});
export const projectUpdateBodySchema = z.object({
  name: z.string().trim().min(1).max(120).optional(),
  description: z.string().trim().max(2000).optional(),
  version: versionSchema,
});

// ---------- members ----------
export const memberParamsSchema = z.object({ projectId: idSchema, userId: idSchema });
export const memberSchema = z.object({
  userId: z.number().int(),
  email: z.string(),
  displayName: z.string(),
  role: projectRoleSchema,
  version: z.number().int(),
});
export type Member = z.infer<typeof memberSchema>;
export const memberListSchema = z.object({ members: z.array(memberSchema) });
export const memberUpdateBodySchema = z.object({ role: projectRoleSchema, version: versionSchema });

// ---------- invitations ----------
export const invitationParamsSchema = z.object({ projectId: idSchema, invitationId: idSchema });
export const invitationTokenParamsSchema = z.object({ token: z.string().min(16).max(200) });
export const invitationCreateBodySchema = z.object({ email: emailSchema, role: projectRoleSchema });
export const invitationSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  role: projectRoleSchema,
  invitedBy: z.string(),
  createdAt: z.string(),
  expiresAt: z.string(),
  /** present on the answer to a create: false when the e-mail could not be handed to the SMTP server */
  mailDelivered: z.boolean().optional(),
});
export type Invitation = z.infer<typeof invitationSchema>;
export const invitationListSchema = z.object({ invitations: z.array(invitationSchema) });
export const invitationPreviewSchema = z.object({ projectName: z.string(), role: projectRoleSchema, email: z.string(), invitedBy: z.string() });
/** Answer to accepting an invitation: the project as the new member now sees it. */
export const invitationAcceptResponseSchema = z.object({ project: projectSchema });

// ---------- designs (many per project, every save kept as a design version) ----------
// Route and field names are a public contract (scripts outside the repository use them).
export const designParamsSchema = z.object({ projectId: idSchema, designId: idSchema });
export const designVersionParamsSchema = z.object({ projectId: idSchema, designId: idSchema, version: idSchema });
/** The design's name; kept equal to the document's `name` (a PUT with `name` sets both). */
export const designNameSchema = z.string().trim().min(1).max(200);

export const designSummarySchema = z.object({
  id: z.number().int(),
  name: z.string(),
  siteCount: z.number().int(),
  version: z.number().int(),
  updatedAt: z.string(),
  /** display name of who saved last; null when unknown (account deleted, seeded rows) */
  updatedBy: z.string().nullable(),
  /** worst relative boundary bound (U or V) of the far-field check, computed at save; null with no sites */
  worstRelBound: z.number().nullable(),
  /** the design's target relative error (document refinement.targetRelError), to compare with worstRelBound; null only for a stored document without it */
  targetRelError: z.number().nullable(),
});
export type DesignSummary = z.infer<typeof designSummarySchema>;
export const designListSchema = z.object({ designs: z.array(designSummarySchema) });

export const designDetailSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  document: designSchema,
  version: z.number().int(),
  updatedAt: z.string(),
  updatedBy: z.string().nullable(),
});
export type DesignDetail = z.infer<typeof designDetailSchema>;
export const designResponseSchema = z.object({ design: designDetailSchema });

/** `{ name, document? }` starts a design (an empty one without `document`); `{ name, copyOf }` duplicates one of the project. */
export const designCreateBodySchema = z.union([
  z.object({ name: designNameSchema, copyOf: idSchema }).strict(),
  z.object({ name: designNameSchema, document: designInputSchema.optional() }).strict(),
]);
export const designUpdateBodySchema = z.object({ document: designInputSchema, version: versionSchema, name: designNameSchema.optional() });

export const designVersionSummarySchema = z.object({
  version: z.number().int(),
  name: z.string(),
  siteCount: z.number().int(),
  /** sha256 (hex) of the canonical JSON of the document (keys sorted, no spaces) */
  sha256: z.string(),
  createdAt: z.string(),
  createdBy: z.string().nullable(),
});
export const designVersionListSchema = z.object({ versions: z.array(designVersionSummarySchema) });
export const designVersionResponseSchema = z.object({ version: designVersionSummarySchema.extend({ document: designSchema }) });

/** Imports parse and validate a whole file and write nothing; `line` is 1-based in the uploaded file. */
export const importErrorSchema = z.object({ line: z.number().int(), message: z.string() });
export const designImportResponseSchema = z.object({ sites: z.array(siteSchema), errors: z.array(importErrorSchema) });
export type DesignImportResponse = z.infer<typeof designImportResponseSchema>;
export const designExportFormats = ['json', 'csv', 'xyz', 'placement'] as const;
export const designExportQuerySchema = z.object({ format: z.enum(designExportFormats) });

// ---------- audit ----------
export const auditEntrySchema = z.object({
  id: z.number().int(),
  at: z.string(),
  actor: z.string().nullable(),
  action: z.string(),
  /** current display name of the member the entry concerns (detail.userId), when it names one who still has an account */
  subject: z.string().nullable(),
  detail: z.record(z.string(), z.unknown()),
});
export const auditListSchema = z.object({ entries: z.array(auditEntrySchema) });
/** Newest first; `before` pages backwards by entry id. */
export const auditQuerySchema = z.object({
  limit: decimalIntSchema.pipe(z.number().min(1).max(500)).default(100),
  before: idSchema.optional(),
});

// ---------- admin: captured mail ----------
export const capturedMailSchema = z.object({
  id: z.number().int(),
  receivedAt: z.string(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
});
export type CapturedMail = z.infer<typeof capturedMailSchema>;
export const capturedMailListSchema = z.object({ messages: z.array(capturedMailSchema) });

// ---------- jobs (meshes and solves run by workers from a queue) ----------
// Route and field names are a public contract (scripts outside the repository use them).
export const jobKinds = ['mesh', 'coulomb', 'convergence'] as const;
export const jobKindSchema = z.enum(jobKinds);
export type JobKind = z.infer<typeof jobKindSchema>;
export const jobStates = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export const jobStateSchema = z.enum(jobStates);
export type JobState = z.infer<typeof jobStateSchema>;

export const jobOptionsSchema = z
  .object({
    order: z.union([z.literal(1), z.literal(2)]).optional(),
    adaptive: z.boolean().optional(),
    sweep: z.enum(['refinement', 'box']).optional(),
  })
  .strict();
export type JobOptions = z.infer<typeof jobOptionsSchema>;
export const jobCreateBodySchema = z.object({ kind: jobKindSchema, options: jobOptionsSchema.default({}) }).strict();
export type JobCreateBody = z.infer<typeof jobCreateBodySchema>;
export const jobParamsSchema = z.object({ projectId: idSchema, jobId: idSchema });

/** Structured progress: the phase (e.g. "estimate", "mesh", "assemble", "solve", "encode", "store"), optional level and site, and a fraction 0..1. */
export const jobProgressSchema = z.object({
  phase: z.string(),
  fraction: z.number().min(0).max(1),
  level: z.number().int().optional(),
  site: z.string().optional(),
});
export type JobProgress = z.infer<typeof jobProgressSchema>;

export const jobSchema = z.object({
  id: z.number().int(),
  kind: jobKindSchema,
  designId: z.number().int(),
  designVersion: z.number().int(),
  options: jobOptionsSchema,
  state: jobStateSchema,
  progress: jobProgressSchema,
  revisionId: z.number().int().nullable(),
  /** why a failed job failed, in words */
  error: z.string().nullable(),
  /** true on the answer to a POST that found an existing revision for the same content and options */
  reused: z.boolean().optional(),
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  createdBy: z.string().nullable(),
});
export type Job = z.infer<typeof jobSchema>;
export const jobResponseSchema = z.object({ job: jobSchema });
export const jobListSchema = z.object({ jobs: z.array(jobSchema) });

// ---------- revisions (immutable results of finished jobs) ----------
export const revisionParamsSchema = z.object({ projectId: idSchema, revisionId: idSchema });
/** potential.f64 (coulomb revisions): Float64 little-endian volts, one per vertex of the revision's mesh.twmesh */
export const revisionFileNames = ['mesh.vtu', 'mesh.vtk', 'mesh.twmesh', 'results.json', 'results.csv', 'potential.f64'] as const;
export const revisionFileParamsSchema = z.object({ projectId: idSchema, revisionId: idSchema, name: z.enum(revisionFileNames) });
export const revisionSchema = z.object({
  id: z.number().int(),
  kind: jobKindSchema,
  jobId: z.number().int().nullable(),
  designId: z.number().int(),
  designVersion: z.number().int(),
  /** sha256 of the canonical JSON of the design version the job read */
  designSha256: z.string(),
  options: jobOptionsSchema,
  /** package version and git commit (when known) of the software that computed it */
  software: z.object({ version: z.string(), commit: z.string().nullable() }),
  timings: z.record(z.string(), z.number()),
  /** exactly the keys the CLI's --json prints for the same command */
  summary: z.record(z.string(), z.unknown()),
  /** files that can be downloaded from .../files/:name */
  files: z.array(z.object({ name: z.enum(revisionFileNames), bytes: z.number().int(), contentType: z.string() })),
  createdAt: z.string(),
  createdBy: z.string().nullable(),
});
export type Revision = z.infer<typeof revisionSchema>;
export const revisionResponseSchema = z.object({ revision: revisionSchema });
export const revisionListSchema = z.object({ revisions: z.array(revisionSchema.omit({ summary: true })) });
export const revisionListQuerySchema = z.object({ designId: idSchema.optional() });

// ---------- personal API tokens ----------
export const apiTokenCreateBodySchema = z.object({ name: z.string().trim().min(1).max(80) }).strict();
export const apiTokenParamsSchema = z.object({ tokenId: idSchema });
export const apiTokenSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  /** first characters of the token, to tell tokens apart; the token itself is shown once, at creation */
  prefix: z.string(),
  createdAt: z.string(),
  lastUsedAt: z.string().nullable(),
});
export const apiTokenListSchema = z.object({ tokens: z.array(apiTokenSchema) });
export const apiTokenCreatedSchema = z.object({ token: apiTokenSchema, secret: z.string() });
export type ApiToken = z.infer<typeof apiTokenSchema>;
export type ApiTokenCreated = z.infer<typeof apiTokenCreatedSchema>;

// ---------- account notifications ----------
/** `jobMail`: e-mail me when a job I started ran longer than a minute and then finished or failed */
export const accountNotificationsSchema = z.object({ jobMail: z.boolean() }).strict();
export type AccountNotifications = z.infer<typeof accountNotificationsSchema>;
