// Automatic reminders: REMINDER_LEAD_DAYS before a review deadline, each panel reviewer with a
// review outstanding gets one e-mail. "Once" is kept by the database: the reminder's timestamp
// is set with `WHERE autoReminderSentAt IS NULL` in the same transaction that queues the mail,
// so several processes or repeated checks never send it twice.
import { Op } from "sequelize";
import { writeAudit } from "~/lib/audit.server";
import { enqueueMail } from "~/lib/mail/queue.server";
import { Call, CallReview, ReviewPanelMember, sequelize, User } from "~/models/index.server";
import { outstandingFor, reminderMail } from "./chair.server";
import { REMINDER_LEAD_DAYS } from "./vocabulary";

export async function sendDueReminders({ now = new Date() }: { now?: Date } = {}) {
  const horizon = new Date(now.getTime() + REMINDER_LEAD_DAYS * 86_400_000);
  const reviews = await CallReview.findAll({ where: { committedAt: { [Op.ne]: null }, reviewDeadlineAt: { [Op.gt]: now, [Op.lte]: horizon } } });
  let sent = 0;
  for (const review of reviews) {
    const members = await ReviewPanelMember.findAll({ where: { callId: review.callId, autoReminderSentAt: null } });
    for (const member of members) {
      const did = await sequelize.transaction(async (transaction) => {
        const items = await outstandingFor({ callId: review.callId as number, reviewerId: member.reviewerId as number, transaction });
        if (items.length === 0) return false;
        const [claimed] = await ReviewPanelMember.update({ autoReminderSentAt: now }, { where: { id: member.id, autoReminderSentAt: null }, transaction });
        if (claimed !== 1) return false;
        const [call, reviewer] = await Promise.all([Call.findByPk(review.callId as number, { transaction }), User.findByPk(member.reviewerId as number, { transaction })]);
        if (!call || !reviewer) return false;
        await enqueueMail({ to: reviewer.email, ...reminderMail({ reviewer, call, deadline: review.reviewDeadlineAt, items: items.map((a) => ({ code: a.proposal?.code ?? null, title: a.proposal?.title ?? "" })) }) }, transaction);
        await writeAudit({ actorId: null, action: "review.reminder_sent", entityType: "user", entityId: reviewer.id, details: { callId: call.id, outstanding: items.length, by: "automatic" } }, transaction);
        return true;
      });
      if (did) sent++;
    }
  }
  return { sent };
}

let timer: NodeJS.Timeout | null = null;

/** Checks for due reminders every few minutes in the server process (beside the mail worker). */
export function startReminderWorker(intervalMs = 5 * 60_000) {
  if (timer) return;
  const tick = () => sendDueReminders().catch((error) => console.error("[review] reminder check failed:", error instanceof Error ? error.message : error));
  timer = setInterval(tick, intervalMs);
  timer.unref();
  setTimeout(tick, 10_000).unref();
}

export function stopReminderWorker() {
  if (timer) clearInterval(timer);
  timer = null;
}
