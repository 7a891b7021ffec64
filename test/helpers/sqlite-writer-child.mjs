// Child process of the shared-file tests: another SQLite program writing a project file,
// through better-sqlite3 (an SQLite build independent of the code under test).
//   crash <file>  rollback-journal mode, a one-page cache and large rows, so SQLite must
//                 write changed pages into the file itself before COMMIT; prints "ready"
//                 with the transaction still open and waits to be killed.
//   wal <file>    switches the file to write-ahead-log mode, commits a change (it stays in
//                 <file>-wal while the connection is open), prints "ready", waits to be killed.
//   hold <file>   BEGIN IMMEDIATE (SQLite's write lock), changes the project name, prints
//                 "ready"; on a "commit" line on stdin commits, prints "committed" and exits.
import Database from 'better-sqlite3';

const [mode, file] = process.argv.slice(2);
const db = new Database(file, { timeout: 10_000 });
const wait = () => setInterval(() => {}, 1000);

if (mode === 'crash') {
  db.pragma('journal_mode = DELETE');
  db.pragma('cache_size = 1');
  db.exec('BEGIN');
  db.prepare("UPDATE meta SET value = ? WHERE key = 'name'").run(JSON.stringify('uncommitted name'));
  const ins = db.prepare('INSERT INTO part_library (id, pos, part_class, name, cost, params) VALUES (?, ?, ?, ?, ?, ?)');
  for (let i = 0; i < 400; i++) ins.run(`torn-${i}`, 10_000 + i, 'resistor', `uncommitted ${i}`, 1, JSON.stringify({ pad: 'x'.repeat(3000) }));
  process.stdout.write('ready\n');
  wait();
} else if (mode === 'wal') {
  db.pragma('journal_mode = WAL');
  db.pragma('wal_autocheckpoint = 0');
  db.prepare("UPDATE meta SET value = ? WHERE key = 'name'").run(JSON.stringify('committed in the log'));
  process.stdout.write('ready\n');
  wait();
} else if (mode === 'hold') {
  db.pragma('journal_mode = DELETE');
  db.exec('BEGIN IMMEDIATE');
  db.prepare("UPDATE meta SET value = ? WHERE key = 'name'").run(JSON.stringify('written by the other program'));
  process.stdout.write('ready\n');
  process.stdin.on('data', (d) => {
    if (String(d).includes('commit')) {
      db.exec('COMMIT');
      db.close();
      process.stdout.write('committed\n');
      process.exit(0);
    }
  });
} else {
  process.stderr.write(`unknown mode ${mode}\n`);
  process.exit(2);
}
