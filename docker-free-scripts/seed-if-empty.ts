// Seeds the demo only into an empty database, so `npm start` run twice keeps what is there.
import knexFactory from 'knex';
import config from '../knexfile.ts';
import { seed } from '../db/seeds/01_demo_hospital.ts';

const knex = knexFactory(config);
try {
  const [{ n }] = await knex('units').count<{ n: number }[]>({ n: '*' });
  if (Number(n) === 0) {
    console.log('[ebbwatch] seeding the demo hospital');
    await seed(knex);
  } else {
    console.log('[ebbwatch] database has data: demo seed not needed');
  }
} finally {
  await knex.destroy();
}
