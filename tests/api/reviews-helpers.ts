import type { Express } from 'express';
import { sql } from 'drizzle-orm';
import nodemailer from 'nodemailer';
import type { FaultTreeModel } from '../../shared/model-file.js';
import { startSmtpFake, type SmtpFake } from '../../server/mail/smtp-fake.js';
import type { AppDeps } from '../../server/app.js';
import { createTestApp, signedInAgent } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';
import { seedWorld, type World } from './helpers/world.js';

/** An invented 1oo2 pair of pressure transmitters on a fictional separator (rates per hour, times in hours). */
export function transmitterPair(lambdaB = 2.0e-7): FaultTreeModel {
  return {
    format: 'proofline/model',
    version: 1,
    name: 'Separator V-210 high pressure, 1oo2',
    kind: 'fault-tree',
    mission: { hours: 87_600, demand: 'low' },
    events: [
      { id: 'PT-A', label: 'Transmitter A', lambdaDU: 2.0e-7, proofTest: { intervalHours: 8760 } },
      { id: 'PT-B', label: 'Transmitter B', lambdaDU: lambdaB, proofTest: { intervalHours: 8760 } },
    ],
    gates: [{ id: 'TOP', label: 'Both transmitters fail', type: 'and', inputs: ['PT-A', 'PT-B'] }],
    top: 'TOP',
  };
}

export interface ReviewWorld {
  database: TestDatabase;
  app: Express;
  smtp: SmtpFake;
  world: World;
}

/**
 * The test database and an app whose notices go to a local SMTP fake (users' addresses: username@proofline.test).
 * `deps` adds to the app, e.g. a solver (given the database, since it is opened here).
 */
export async function openReviewWorld(deps: (database: TestDatabase) => Promise<Partial<AppDeps>> = async () => ({})): Promise<Omit<ReviewWorld, 'world'>> {
  const database = await openTestDatabase();
  const smtp = await startSmtpFake(0);
  const transport = nodemailer.createTransport({ host: '127.0.0.1', port: smtp.port, secure: false, ignoreTLS: true });
  const app = createTestApp(database, { ...(await deps(database)), mail: { transport, from: 'Proofline <proofline@proofline.test>', domain: 'proofline.test' } });
  return { database, app, smtp };
}

/** Empties the tables and the fake's inbox, and seeds the fixed world. */
export async function resetReviewWorld(context: Omit<ReviewWorld, 'world'>): Promise<World> {
  await resetDatabase(context.database.db);
  await context.database.db.execute(sql`delete from mail_messages`);
  // Stored results belong to no project; the diff test's own are keyed review-test-*.
  await context.database.db.execute(sql`delete from solve_results where cache_key like 'review-test-%'`);
  (context.smtp.received as unknown[]).length = 0;
  return seedWorld(context.database.db);
}

/** A model with one issued revision in SIF "draft" of project A, made by `username`. */
export async function issuedModel(app: Express, world: World, username = 'engineer', file: FaultTreeModel = transmitterPair()) {
  const agent = await signedInAgent(app, username);
  const created = await agent.post(`/api/projects/${world.projectA}/sifs/${world.sifDraft}/models`).send({ file });
  if (created.status !== 201) throw new Error(`model not created: ${JSON.stringify(created.body)}`);
  const modelId = created.body.id as string;
  const issued = await agent.post(`/api/projects/${world.projectA}/models/${modelId}/revisions`).send({ draftVersion: created.body.draftVersion, reason: 'First issue' });
  if (issued.status !== 201) throw new Error(`revision not issued: ${JSON.stringify(issued.body)}`);
  return { agent, modelId };
}

/** Saves a new draft and issues it as the next revision. */
export async function issueNext(app: Express, world: World, modelId: string, file: FaultTreeModel, username = 'engineer') {
  const agent = await signedInAgent(app, username);
  const model = await agent.get(`/api/projects/${world.projectA}/models/${modelId}`);
  const saved = await agent.put(`/api/projects/${world.projectA}/models/${modelId}/draft`).send({ version: model.body.draft.version, content: file });
  if (saved.status !== 200) throw new Error(`draft not saved: ${JSON.stringify(saved.body)}`);
  const issued = await agent.post(`/api/projects/${world.projectA}/models/${modelId}/revisions`).send({ draftVersion: saved.body.version, reason: 'Answer to review' });
  if (issued.status !== 201) throw new Error(`revision not issued: ${JSON.stringify(issued.body)}`);
  return issued.body.number as number;
}

/** Waits until the fake holds `count` messages (nodemailer returns once the fake accepted, so this is brief). */
export async function receivedAtLeast(smtp: SmtpFake, count: number): Promise<void> {
  for (let tries = 0; tries < 100 && smtp.received.length < count; tries++) await new Promise((resolve) => setTimeout(resolve, 20));
}
