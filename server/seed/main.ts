// npm run seed: install the demo scenario (server/seed/demo.ts) into the configured database.

import { QueryTypes } from 'sequelize';
import { getConfig } from '../config';
import { initModels } from '../db/models';
import { createSequelize } from '../db/sequelize';
import { demoSignInText, seedDemo } from './demo';
import { drainWithWorker } from './demo-runs';
import { seedDemoWaiversWhenReady } from './demo-waivers';

async function main(): Promise<number> {
  const config = getConfig();
  if (config.isProduction) {
    process.stderr.write('seed: refusing to install demo users with published passwords in production\n');
    return 1;
  }
  const sequelize = createSequelize(config);
  initModels(sequelize);
  try {
    const result = await seedDemo(sequelize);
    process.stdout.write(result.created.length ? `seed: created ${result.created.join('; ')}\n` : 'seed: demo data already present\n');
    const [{ open }] = await sequelize.query<{ open: number }>(`select cast(count(*) as integer) as open from runs where state in ('queued', 'running')`, {
      type: QueryTypes.SELECT,
    });
    if (open > 0) {
      process.stdout.write(`seed: checking ${open} queued run(s) with the worker\n`);
      const code = await drainWithWorker();
      if (code !== 0) process.stderr.write(`seed: the worker exited with code ${code}; the runs stay queued for the next worker\n`);
    }
    await seedDemoWaiversWhenReady(config, sequelize, (line) => process.stdout.write(`seed: ${line}\n`), 0);
    process.stdout.write(demoSignInText(config.publicUrl) + '\n');
    return 0;
  } finally {
    await sequelize.close();
  }
}

main().then(
  (code) => process.exit(code),
  (err) => {
    process.stderr.write(`seed: ${err instanceof Error ? err.message : String(err)}\n`);
    process.exit(1);
  },
);
