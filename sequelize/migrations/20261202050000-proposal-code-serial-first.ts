// Proposal codes become Nightshare's own format, the serial first and then the short semester:
// NS-2027A-014 → 014/27A. The code is derived from (callId, serial), which stays unique; the code
// itself is no longer unique on its own (2027A and 2127A share "27A"), so its unique index becomes
// a plain one.
import { QueryTypes, type QueryInterface } from "sequelize";

async function codeIndexes(qi: QueryInterface) {
  const rows = await qi.sequelize.query<{ Key_name: string; Non_unique: number | string }>("SHOW INDEX FROM proposals WHERE Column_name = 'code'", { type: QueryTypes.SELECT });
  return rows;
}

export async function up({ context: qi }: { context: QueryInterface }) {
  for (const index of await codeIndexes(qi)) {
    if (Number(index.Non_unique) === 0) await qi.removeIndex("proposals", index.Key_name);
  }
  await qi.addIndex("proposals", ["code"], { name: "proposals_code" });
  await qi.sequelize.query(
    `UPDATE proposals p JOIN calls c ON c.id = p.callId
        SET p.code = CONCAT(IF(p.serial < 1000, LPAD(p.serial, 3, '0'), p.serial), '/', IF(c.semesterCode REGEXP '^[0-9]{4}[AB]$', SUBSTRING(c.semesterCode, 3), c.semesterCode))
      WHERE p.code LIKE 'NS-%' AND p.serial IS NOT NULL`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(
    `UPDATE proposals p JOIN calls c ON c.id = p.callId
        SET p.code = CONCAT('NS-', c.semesterCode, '-', IF(p.serial < 1000, LPAD(p.serial, 3, '0'), p.serial))
      WHERE p.code LIKE '%/%' AND p.serial IS NOT NULL`,
  );
  await qi.removeIndex("proposals", "proposals_code");
  await qi.addIndex("proposals", ["code"], { unique: true, name: "code" });
}
