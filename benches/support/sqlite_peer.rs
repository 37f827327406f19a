//! The common alternative to tankwalk's store, for side-by-side figures:
//! SQLite (bundled, through rusqlite) in WAL mode with `synchronous=FULL`, so
//! that a commit returns only once it is on disk, as a tankwalk save does.
//!
//! One table holds what the sled store holds: the record's id, its target and
//! time (indexed both ways, like `by_target` and `by_time`) and its JSON.

use std::path::Path;

use rusqlite::{Connection, params};
use tankwalk::model::record::Record;

/// Opens (or creates) the peer database at `path`.
pub fn open(path: &Path) -> Connection {
    let conn = Connection::open(path).expect("sqlite opens");
    conn.execute_batch(
        "PRAGMA journal_mode = WAL;
         PRAGMA synchronous = FULL;
         CREATE TABLE IF NOT EXISTS records (
             id BLOB PRIMARY KEY,
             target TEXT,
             taken_ms INTEGER NOT NULL,
             body TEXT NOT NULL
         ) WITHOUT ROWID;
         CREATE INDEX IF NOT EXISTS by_target ON records (target, taken_ms);
         CREATE INDEX IF NOT EXISTS by_time ON records (taken_ms);",
    )
    .expect("sqlite schema");
    conn
}

/// The target as one text key: `T:<id>` or `S:<id>`.
pub fn target_key(record: &Record) -> Option<String> {
    record.body.target().map(|t| format!("{}:{}", if t.tank().is_some() { "T" } else { "S" }, t.id()))
}

/// Saves records in one transaction (one commit, durable when it returns),
/// after the same check a tankwalk save runs.
pub fn save(conn: &mut Connection, records: &[Record]) {
    let tx = conn.transaction().expect("transaction");
    {
        let mut insert = tx
            .prepare_cached("INSERT INTO records (id, target, taken_ms, body) VALUES (?1, ?2, ?3, ?4)")
            .expect("insert");
        for record in records {
            record.check().expect("a valid record");
            let body = serde_json::to_string(record).expect("JSON");
            insert
                .execute(params![
                    record.id.to_bytes().as_slice(),
                    target_key(record),
                    record.taken_at.timestamp_millis(),
                    body
                ])
                .expect("insert");
        }
    }
    tx.commit().expect("commit");
}

/// Records with any of `targets` (target keys) taken from `since_ms`, newest first, parsed.
pub fn history(conn: &Connection, targets: &[String], since_ms: i64) -> Vec<Record> {
    let mut out = Vec::new();
    if targets.is_empty() {
        let mut q =
            conn.prepare_cached("SELECT body FROM records WHERE taken_ms >= ?1 ORDER BY taken_ms DESC").expect("query");
        let rows = q.query_map(params![since_ms], |row| row.get::<_, String>(0)).expect("rows");
        for body in rows {
            out.push(serde_json::from_str(&body.expect("row")).expect("a record"));
        }
    } else {
        let mut q = conn
            .prepare_cached("SELECT body FROM records WHERE target = ?1 AND taken_ms >= ?2 ORDER BY taken_ms DESC")
            .expect("query");
        for target in targets {
            let rows = q.query_map(params![target, since_ms], |row| row.get::<_, String>(0)).expect("rows");
            for body in rows {
                out.push(serde_json::from_str(&body.expect("row")).expect("a record"));
            }
        }
        out.sort_by_key(|r: &Record| std::cmp::Reverse(r.time_key()));
    }
    out
}
