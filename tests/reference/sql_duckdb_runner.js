// Runs SQL cases on DuckDB (npm @duckdb/node-api) for sql_export.py.
// stdin: JSON list of {statements: [sql...], query: sql}; stdout: JSON list of
// {rows: [[text or null...]...]} or {error: message}. Every case gets a fresh
// in-memory database. Values come back as text (VARCHAR casts in the query).
const { DuckDBInstance } = require('@duckdb/node-api');

async function main() {
  const cases = JSON.parse(require('fs').readFileSync(0, 'utf8'));
  const results = [];
  for (const c of cases) {
    const instance = await DuckDBInstance.create(':memory:');
    const connection = await instance.connect();
    try {
      for (const statement of c.statements) await connection.run(statement);
      const reader = await connection.runAndReadAll(c.query);
      // BIGINT arrives as a JavaScript BigInt, which JSON cannot hold: its decimal text;
      // a DATE as a Date at UTC midnight: its ISO 8601 text.
      const rows = reader.getRowsJS().map((row) => row.map((v) => (typeof v === 'bigint' ? v.toString() : v instanceof Date ? v.toISOString().slice(0, 10) : v)));
      results.push({ rows });
    } catch (e) {
      results.push({ error: String(e.message || e) });
    }
    connection.closeSync();
  }
  process.stdout.write(JSON.stringify(results));
}

main().catch((e) => { console.error(e); process.exit(1); });
