// The batch history in an SQLite file (history_db.hpp gives the rules both backends keep).
//
// Safety under concurrent writers on one machine:
//  - WAL journal mode (readers never block the writer and see only committed results) and a busy timeout of
//    busy_timeout_ms: a writer waits for another's transaction instead of failing.
//  - Each record() is one transaction begun with BEGIN IMMEDIATE (the write lock is taken before anything is read,
//    so two writers cannot both decide to insert the same result).
//  - The schema is created or upgraded inside that same transaction, so racing first writers cannot clash.
// SQLite's locking is not safe on a network file system: a history shared by several labs belongs on a server.
#pragma once

#include <memory>
#include <string>

#include "src/history/history_db.hpp"

namespace spreadfit::history {

/// Opens the SQLite history `file`. Access::Write creates the file when missing and switches it to WAL mode
/// after checking it is a spreadfit history (another program's file is left as it was).
std::unique_ptr<HistoryStore> open_sqlite_history(const std::string& file, Access access);

}  // namespace spreadfit::history
