import request from 'supertest';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { deviceFields, deviceList } from '../../shared/api/devices.js';
import { DEMO_DEVICES } from '../../server/seed/demo-devices.js';
import { DEMO_USERS, seedDemoWorkspace } from '../../server/seed/demo-workspace.js';
import { createTestApp } from './helpers/test-app.js';
import { openTestDatabase, resetDatabase, type TestDatabase } from './helpers/test-database.js';

let database: TestDatabase;

beforeAll(async () => {
  database = await openTestDatabase();
});
afterAll(async () => database.close());
beforeEach(async () => resetDatabase(database.db));

describe('demo device library', () => {
  it('has about 30 valid records of every kind, from makers marked fictional', () => {
    expect(DEMO_DEVICES.length).toBe(30);
    for (const fields of DEMO_DEVICES) {
      expect(deviceFields.safeParse(fields).success, fields.model).toBe(true);
      expect(fields.maker).toMatch(/\(fictional\)$/);
      // Plausibility (common practice): no field device fails dangerously undetected more than once per
      // 10^5 hours on average, i.e. lambdaDU below 1e-5 per hour.
      expect(fields.lambdaDU).toBeLessThan(1e-5);
    }
    expect(new Set(DEMO_DEVICES.map((fields) => fields.category))).toEqual(
      new Set(['transmitter', 'switch', 'logic-solver', 'valve', 'actuator', 'relay', 'other']),
    );
  });

  it('is seeded with the demo workspace and readable by the demo viewer', async () => {
    expect(await seedDemoWorkspace(database.db)).toBe(true);
    const viewer = DEMO_USERS.find((user) => user.username === 'viewer')!;
    const agent = request.agent(createTestApp(database));
    expect((await agent.post('/api/auth/sign-in').send({ username: 'viewer', password: viewer.password })).status).toBe(200);
    const list = deviceList.parse((await agent.get('/api/devices')).body);
    expect(list).toHaveLength(30);
    for (const item of list) {
      expect(item.version).toBe(1);
      expect(item.safeFailureFraction).toBeGreaterThanOrEqual(0);
      expect(item.safeFailureFraction).toBeLessThanOrEqual(1);
    }
  });
});
