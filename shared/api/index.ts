/**
 * The Proofline HTTP API contract, shared by the Angular client and the Express server.
 * Every body and query is parsed with the schema named here; every response of the server matches the
 * schema named here. JSON only; session cookie auth (`proofline.sid`, httpOnly, SameSite=Strict).
 * Failures: `{ error: { code, message, details } }` (errors.ts): 400 validation_failed (details.issues
 * names each field), 401 unauthenticated / invalid_credentials, 403 forbidden, 404 not_found (also for
 * unknown /api routes, and for a project or SIF the user may not see), 409 version_conflict /
 * already_exists / conflict, 429 rate_limited, 503 service_unavailable, 500 internal_error.
 *
 * Who may do what
 * - Site admin (users.isAdmin): manages accounts; sees every project (myRole null unless a member), may
 *   manage any project's members, edit its details and archive it. An admin edits SIFs only through a
 *   project role.
 * - Any signed-in user may create a project and becomes its lead.
 * - Project roles: lead (members, project details, archive, everything an engineer does, approve),
 *   engineer (create, edit, archive SIFs; status draft / in-review / superseded), reviewer (read; status
 *   in-review -> approved or in-review -> draft, nothing else), viewer (read).
 * - A user who is neither a member nor an admin gets 404 for the project and everything in it.
 * - permissions.ts holds the table (canDo, canChangeStatus). Approved and superseded SIFs are frozen:
 *   changing their content needs status draft in the same PATCH (409 conflict otherwise). Archived SIFs
 *   and SIFs of archived projects refuse changes (409 conflict) until restored with archived=false.
 * - A SIF whose model has an issued revision is approved only by a review round (409 conflict on
 *   PATCH status=approved), where authors of the revision cannot decide.
 *
 * Routes                                                body / query            response
 * POST   /api/auth/sign-in                              signInBody              200 user (new session)
 * POST   /api/auth/sign-out                             -                       204
 * GET    /api/auth/me                                   -                       200 user | 401
 * POST   /api/auth/password                             changePasswordBody      204 (other sessions end)
 * GET    /api/users                  signed in          -                       200 userList
 * POST   /api/users                  admin              createUserBody          201 user
 * PATCH  /api/users/:userId          admin              updateUserBody          200 user
 * GET    /api/projects               signed in          projectListQuery        200 projectList
 * POST   /api/projects               signed in          createProjectBody       201 project (caller is lead)
 * GET    /api/projects/:projectId    member or admin    -                       200 project
 * PATCH  /api/projects/:projectId    lead or admin      updateProjectBody       200 project
 * POST   /api/projects/:projectId/archive   lead/admin  archiveBody             200 project
 * GET    /api/projects/:projectId/members   member/admin -                      200 memberList
 * PUT    /api/projects/:projectId/members/:userId  lead/admin  putMemberBody    200 member
 * DELETE /api/projects/:projectId/members/:userId  lead/admin  -                204 (not the last lead: 409)
 * GET    /api/projects/:projectId/sifs      member/admin sifListQuery           200 sifPage
 * POST   /api/projects/:projectId/sifs      lead/engineer createSifBody         201 sif
 * GET    /api/projects/:projectId/sifs/:sifId  member/admin -                   200 sif
 * PATCH  /api/projects/:projectId/sifs/:sifId  lead/engineer/reviewer updateSifBody  200 sif
 *        (stale version: 409 version_conflict, details = sifConflictDetails { current })
 * POST   /api/projects/:projectId/sifs/:sifId/archive  lead/engineer archiveBody  200 sif
 *
 * Models and solves (models.ts, solves.ts). Members of every role and site admins read; leads and
 * engineers change (reviewers and viewers 403); archived projects and SIFs refuse changes (409).
 * GET    /api/projects/:projectId/sifs/:sifId/models      member/admin  -                 200 modelList
 * POST   /api/projects/:projectId/sifs/:sifId/models      lead/engineer createModelBody   201 modelDetail
 * GET    /api/projects/:projectId/models/:modelId          member/admin  -                 200 modelDetail
 * PUT    /api/projects/:projectId/models/:modelId/draft    lead/engineer saveDraftBody     200 modelDraft
 *        (stale version: 409 version_conflict, details = draftConflictDetails { current })
 * POST   /api/projects/:projectId/models/:modelId/import   lead/engineer importModelBody   200 modelDraft (409 as above)
 * GET    /api/projects/:projectId/models/:modelId/export   member/admin  exportModelQuery  200 model file (attachment)
 * GET    /api/projects/:projectId/models/:modelId/revisions  member/admin -                200 modelRevisionList
 * POST   /api/projects/:projectId/models/:modelId/revisions  lead/engineer issueRevisionBody 201 modelRevisionDetail (409 as above)
 * GET    /api/projects/:projectId/models/:modelId/revisions/:number  member/admin -        200 modelRevisionDetail
 * POST   /api/projects/:projectId/models/:modelId/solves   lead/engineer startSolveBody    202 solve (queued) | 200 solve (stored result)
 * GET    /api/projects/:projectId/models/:modelId/solves   member/admin  solveListQuery    200 solveList
 * GET    /api/projects/:projectId/solves/:solveId          member/admin  -                 200 solve
 * GET    /api/projects/:projectId/solves/:solveId/events   member/admin  -                 200 text/event-stream (status, progress, done)
 * POST   /api/projects/:projectId/solves/:solveId/cancel   lead/engineer -                 200 solve (finished already: 409 conflict)
 *
 * Results of a succeeded solve (results.ts). Members of every role and site admins read; a solve that has
 * not succeeded is 409 conflict.
 * GET    /api/projects/:projectId/solves/:solveId/analysis member/admin  -                 200 resultAnalysis
 * GET    /api/projects/:projectId/solves/:solveId/report   member/admin  -                 200 application/pdf (attachment)
 * GET    /api/projects/:projectId/solves/:solveId/csv      member/admin  resultCsvQuery    200 text/csv (attachment)
 *
 * Device library (devices.ts): site-wide, shared by every project. "reader" = site admin or member of any
 * project (others get 404); "editor" = site admin or lead/engineer of any active project (others 403).
 * GET    /api/devices/access                    signed in    -                      200 deviceLibraryAccess
 * GET    /api/devices                           reader       deviceListQuery        200 deviceList (current versions)
 * POST   /api/devices                           editor       createDeviceBody       201 deviceDetail (version 1; same maker+model: 409 already_exists)
 * GET    /api/devices/export                    reader       -                      200 text/csv (attachment; formula cells escaped)
 * POST   /api/devices/import/preview            editor       importPreviewBody      200 importPreview (writes nothing)
 * POST   /api/devices/import/confirm            editor       importConfirmBody      200 importResult (invalid rows: 400 unless skipInvalidRows)
 * GET    /api/devices/:deviceId                 reader       -                      200 deviceDetail
 * PUT    /api/devices/:deviceId                 editor       updateDeviceBody       200 deviceDetail (new version; stale: 409 version_conflict)
 * DELETE /api/devices/:deviceId                 editor       -                      204 (a model draft or revision links to it: 409 conflict)
 * POST   /api/devices/:deviceId/archive         editor       -                      200 deviceDetail (hidden from pickers, links still resolve)
 * POST   /api/devices/:deviceId/restore         editor       -                      200 deviceDetail
 * GET    /api/devices/:deviceId/usage           reader       -                      200 deviceUsage (only models of projects the caller may read)
 * GET    /api/devices/:deviceId/versions        reader       -                      200 deviceVersionList (newest first)
 * GET    /api/devices/:deviceId/versions/:version  reader    -                      200 deviceVersion
 * POST   /api/devices/:deviceId/evidence        editor       multipart file (+description)  201 deviceDetail (PDF/PNG/JPEG by content, 10 MB: 413)
 * GET    /api/devices/:deviceId/evidence/:evidenceId  reader -                      200 the file (attachment, nosniff)
 * DELETE /api/devices/:deviceId/evidence/:evidenceId  editor -                      204
 *
 * Peer review (reviews.ts, annotations.ts, audit.ts). "Author" = who issued the revision or asked for its
 * review: authors never review it. Reviewers (and leads) are chosen per round, annotate and decide; they
 * cannot edit models. Viewers and site admins read. A round's decision moves the SIF: request -> in-review,
 * approve -> approved, return -> draft; a new revision of an approved SIF's model makes it superseded.
 * Approval is refused (409) while a must-fix annotation of the model is open.
 * GET    /api/reviews/queue                               signed in      -                  200 reviewRoundList (open rounds I was chosen for)
 * POST   /api/projects/:projectId/models/:modelId/reviews lead/engineer  requestReviewBody  201 reviewRound (one open round per model: 409)
 * GET    /api/projects/:projectId/sifs/:sifId/reviews     member/admin   -                  200 reviewRoundList (newest first)
 * GET    /api/projects/:projectId/reviews/:roundId        member/admin   -                  200 reviewRound
 * POST   /api/projects/:projectId/reviews/:roundId/approve  chosen reviewer/lead, not author  decideReviewBody  200 reviewRound
 * POST   /api/projects/:projectId/reviews/:roundId/return   chosen reviewer/lead, not author  returnReviewBody  200 reviewRound
 * GET    /api/projects/:projectId/models/:modelId/diff    member/admin   revisionDiffQuery  200 revisionDiff
 * GET    /api/projects/:projectId/models/:modelId/annotations  member/admin  annotationListQuery  200 annotationList
 * POST   /api/projects/:projectId/models/:modelId/annotations  lead/engineer/reviewer  createAnnotationBody  201 annotation
 * POST   /api/projects/:projectId/annotations/:annotationId/replies  lead/engineer/reviewer  replyBody  201 annotation
 * POST   /api/projects/:projectId/annotations/:annotationId/resolve  lead/engineer/reviewer  -  200 annotation (already: 409)
 * POST   /api/projects/:projectId/annotations/:annotationId/reopen   lead/engineer/reviewer  -  200 annotation (already: 409)
 * GET    /api/projects/:projectId/audit                   member/admin   auditQuery         200 auditList (oldest first)
 * GET    /api/projects/:projectId/audit/csv               member/admin   auditQuery         200 text/csv (attachment; formula cells escaped)
 * GET    /api/admin/mail                                  admin          -                  200 sentMailList (newest first)
 * GET    /api/me/notices                                  signed in      -                  200 noticeSettings
 * PUT    /api/me/notices                                  signed in      noticeSettingsBody 200 noticeSettings
 */
export * from './errors.js';
export * from './common.js';
export * from './users.js';
export * from './auth.js';
export * from './projects.js';
export * from './sif-target.js';
export * from './sifs.js';
export * from './permissions.js';
export * from './models.js';
export * from './solves.js';
export * from './results.js';
export * from './devices.js';
export * from './reviews.js';
export * from './annotations.js';
export * from './audit.js';
export * from './request-header.js';
