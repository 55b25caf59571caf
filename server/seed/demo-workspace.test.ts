import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp } from '../../tests/api/helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from '../../tests/api/helpers/test-database.js';
import { DEMO_USERS, seedDemoWorkspace } from './demo-workspace.js';

let database: TestDatabase;

beforeAll(async () => {
  database = await openTestDatabase();
});
afterAll(async () => database.close());
beforeEach(async () => resetDatabase(database.db));

describe('seedDemoWorkspace', () => {
  it('seeds an empty database once, and the demo lead reaches the register', async () => {
    expect(await seedDemoWorkspace(database.db)).toBe(true);
    expect(await seedDemoWorkspace(database.db)).toBe(false);
    const app = createTestApp(database);
    const lead = DEMO_USERS.find((user) => user.username === 'lead');
    const agent = request.agent(app);
    expect((await agent.post('/api/auth/sign-in').send({ username: 'lead', password: lead?.password })).status).toBe(200);
    const projects = await agent.get('/api/projects');
    expect(projects.body.length).toBe(2);
    const register = await agent.get(`/api/projects/${projects.body[0].id}/sifs?pageSize=100`);
    expect(register.body.total).toBeGreaterThanOrEqual(6);
    expect(register.body.total).toBeLessThanOrEqual(10);
    const modes = new Set(register.body.items.map((sif: { demandMode: string }) => sif.demandMode));
    expect(modes).toEqual(new Set(['low', 'high', 'continuous']));
  });

  it('leaves a database that already has users alone', async () => {
    await database.db.execute(
      "insert into users (username, display_name, password_hash) values ('someone', 'Someone', 'scrypt$1$1$1$x$y')",
    );
    expect(await seedDemoWorkspace(database.db)).toBe(false);
  });
});
