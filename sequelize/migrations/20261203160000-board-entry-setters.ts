// Who set a proposal's position and its hand-set allocation on the board: a fill by rank run by a
// chair who is conflicted on the proposal must not use what that chair set for it, and must keep
// what another chair set. Null when nobody has, or for choices made before this column.
import type { QueryInterface } from "sequelize";

export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(
    "ALTER TABLE board_entries ADD COLUMN chairRankById INT UNSIGNED NULL, ADD COLUMN allocatedByHandById INT UNSIGNED NULL, " +
      "ADD CONSTRAINT board_entries_chair_rank_by_fk FOREIGN KEY (chairRankById) REFERENCES users (id) ON DELETE SET NULL ON UPDATE CASCADE, " +
      "ADD CONSTRAINT board_entries_by_hand_by_fk FOREIGN KEY (allocatedByHandById) REFERENCES users (id) ON DELETE SET NULL ON UPDATE CASCADE",
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // Raw SQL: Sequelize 6's removeColumn trips over the MariaDB driver's result ("Cannot delete property 'meta'").
  await qi.sequelize.query("ALTER TABLE board_entries DROP FOREIGN KEY board_entries_chair_rank_by_fk, DROP FOREIGN KEY board_entries_by_hand_by_fk");
  await qi.sequelize.query("ALTER TABLE board_entries DROP COLUMN chairRankById, DROP COLUMN allocatedByHandById");
}
