// The batch history on a PostgreSQL server (libpq), shared by several labs and plants. history_db.hpp gives the
// rules both backends keep; here is how the server keeps them:
//  - One connection per store, opened with libpq's own URI syntax and environment (PGHOST, PGUSER, PGPASSWORD,
//    ~/.pgpass, service files, sslmode). spreadfit adds defaults the URI may override: connect_timeout=10 s,
//    TCP keepalives (idle 15 s, interval 5 s, 3 probes) so a dropped connection is noticed, application name.
//  - Each record() is one READ COMMITTED transaction: the row of the same inputs is locked (SELECT ... FOR
//    UPDATE) and replaced, or a new one inserted with ON CONFLICT DO NOTHING, so of two writers racing with the
//    same inputs one inserts and the other then finds and replaces that row. Any lost connection or error before
//    COMMIT leaves nothing (the server rolls the transaction back).
//  - The first writer on an empty database creates the tables, and a writer finding an older schema upgrades it,
//    both under a transaction-scoped advisory lock inside the same transaction (DDL is transactional), so racing
//    first writers cannot clash.
//  - Locks are waited for up to busy_timeout_ms (lock_timeout), as SQLite's busy timeout.
//  - Reads run in one REPEATABLE READ READ ONLY transaction: one consistent snapshot, never a change.
//  - Every statement is parameterised: no value from a test or a user is ever part of the SQL text.
//  - The tables live in the connection's current schema (the first of search_path; choose another with
//    `?options=-csearch_path%3Dqa`). A schema that holds other tables but no spreadfit_schema is refused.
//  - Messages name the database by display_name (no password) and quote the server in one line, with every
//    password taken out (history_location.hpp).
#pragma once

#include <memory>
#include <string>

#include "src/history/history_db.hpp"

namespace spreadfit::history {

/// Connects to the history at `uri` (postgresql://... or postgres://...). Throws io::InputError naming it.
std::unique_ptr<HistoryStore> open_postgres_history(const std::string& uri, Access access);

}  // namespace spreadfit::history
