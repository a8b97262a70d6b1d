import { data } from "react-router";
import { mailTransport } from "~/lib/mail-queue.server";
import { paymentServiceHealth } from "~/lib/payments.server";
import { OutgoingMail, sequelize } from "~/models/index.server";

async function check(fn: () => Promise<unknown>): Promise<"ok" | string> {
  try {
    const result = await fn();
    return typeof result === "string" ? result : "ok";
  } catch (error) {
    return error instanceof Error ? error.message : String(error);
  }
}

export async function loader() {
  const [database, mail, payments] = await Promise.all([
    check(() => sequelize.authenticate()),
    check(() => mailTransport().verify()),
    paymentServiceHealth(),
  ]);
  const pendingMail = database === "ok" ? await OutgoingMail.count({ where: { status: "pending" } }) : null;
  const ok = database === "ok" && mail === "ok" && payments === "ok";
  return data(
    { status: ok ? "ok" : "degraded", database, mail: { transport: mail, pending: pendingMail }, payments },
    { status: database === "ok" ? 200 : 503, headers: { "Cache-Control": "no-store" } },
  );
}
