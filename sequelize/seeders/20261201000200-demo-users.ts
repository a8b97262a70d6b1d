// Demo sign-ins: each of the four named accounts holds exactly the one role its name says
// (every user can propose); a few more reviewers and PIs make the committee and the calls lively.
import type { Sequelize } from "sequelize";
import { RoleGrant, User } from "~/models/index.server";
import type { GrantableRole } from "~/models/RoleGrant";

export const demoUsers: { email: string; name: string; institution: string; member: boolean; roles: GrantableRole[] }[] = [
  { email: "pi@kestrel-ridge.example", name: "Ilse Varga-Moreno", institution: "Tessaly Institute of Astrophysics", member: true, roles: [] },
  { email: "reviewer@kestrel-ridge.example", name: "Tomasz Achterberg", institution: "Orrin College Observatory", member: true, roles: ["reviewer"] },
  { email: "chair@kestrel-ridge.example", name: "Nadia Okonkwo-Lind", institution: "Kestrel Ridge Consortium", member: true, roles: ["chair"] },
  { email: "admin@kestrel-ridge.example", name: "Observatory office", institution: "Kestrel Ridge Observatory", member: true, roles: ["admin"] },
  { email: "reviewer2@kestrel-ridge.example", name: "Priya Castellane", institution: "Vennholm University", member: true, roles: ["reviewer"] },
  { email: "reviewer3@kestrel-ridge.example", name: "Emeric Dunshaw", institution: "Saltmere Institute for Space Science", member: false, roles: ["reviewer"] },
  { email: "reviewer4@kestrel-ridge.example", name: "Yuki Halvorsen", institution: "Tessaly Institute of Astrophysics", member: true, roles: ["reviewer"] },
  { email: "pi2@kestrel-ridge.example", name: "Rafael Quenby", institution: "Brackwater University", member: false, roles: [] },
  { email: "pi3@kestrel-ridge.example", name: "Sunniva Aldama", institution: "Orrin College Observatory", member: true, roles: [] },
  { email: "pi4@kestrel-ridge.example", name: "Kofi Marchetti", institution: "Lowmoor Astronomical Society", member: false, roles: [] },
];

export async function up({ context: sequelize }: { context: Sequelize }) {
  await sequelize.transaction(async (transaction) => {
    for (const demo of demoUsers) {
      const [user] = await User.findOrCreate({
        where: { email: demo.email },
        defaults: { email: demo.email, name: demo.name, institution: demo.institution, isMemberInstitution: demo.member, lastSignInAt: null },
        transaction,
      });
      for (const role of demo.roles) {
        await RoleGrant.findOrCreate({ where: { userId: user.id, role }, defaults: { userId: user.id, role, grantedById: null }, transaction });
      }
    }
  });
}

export async function down() {}
