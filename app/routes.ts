import { type RouteConfig, index, layout, prefix, route } from "@react-router/dev/routes";

export default [
  route("healthz", "routes/healthz.ts"),
  route("api/v1/payments/webhook", "routes/api.v1.payments.webhook.ts"),
  route("api/v1/visibility", "routes/api.v1.visibility.ts"),
  route("api/v1/exposure", "routes/api.v1.exposure.ts"),
  route("api/v1/astrometry", "routes/api.v1.astrometry.ts"),
  route("api/v1/epoch-plan", "routes/api.v1.epoch-plan.ts"),
  route("api/v1/admin/users", "routes/api.v1.admin.users.ts"),
  route("api/v1/proposals", "routes/api.v1.proposals.ts"),
  route("api/v1/proposals/:proposalId", "routes/api.v1.proposals.$proposalId.ts"),
  route("proposals/:proposalId/pdf", "routes/proposals.$proposalId.pdf.ts"),
  route("proposals/:proposalId/files/:fileId", "routes/proposals.$proposalId.files.$fileId.ts"),
  route("sign-in/link", "routes/sign-in.link.ts"),
  route("sign-out", "routes/sign-out.ts"),

  layout("routes/_shell.tsx", [
    index("routes/_index.tsx"),
    route("sign-in", "routes/sign-in.tsx"),
    route("welcome", "routes/welcome.tsx"),
    route("sky-tools", "routes/sky-tools.tsx"),
    route("review", "routes/review._index.tsx"),
    route("committee", "routes/committee._index.tsx"),
    ...prefix("proposals", [
      index("routes/proposals._index.tsx"),
      route("new", "routes/proposals.new.tsx"),
      route(":proposalId", "routes/proposals.$proposalId.tsx", [
        // tabs in their order: Summary · Targets · Observations · Feasibility sheet · Science case · Team · Change log
        index("routes/proposals.$proposalId._index.tsx"),
        route("targets", "routes/proposals.$proposalId.targets.tsx"),
        route("observations", "routes/proposals.$proposalId.observations.tsx"),
        route("feasibility", "routes/proposals.$proposalId.feasibility.tsx"),
        route("science-case", "routes/proposals.$proposalId.science-case.tsx"),
        route("team", "routes/proposals.$proposalId.team.tsx"),
        route("change-log", "routes/proposals.$proposalId.change-log.tsx"),
        // the readiness strip's actions (send, withdraw, reopen, delete); a GET goes to the summary
        route("submit", "routes/proposals.$proposalId.submit.ts"),
      ]),
    ]),
    route("calls", "routes/calls._index.tsx"),
    ...prefix("admin", [
      index("routes/admin._index.tsx"),
      route("users", "routes/admin.users.tsx"),
      route("telescopes", "routes/admin.telescopes._index.tsx"),
      route("telescopes/:telescopeId", "routes/admin.telescopes.$telescopeId.tsx"),
      route("instruments/:instrumentId", "routes/admin.instruments.$instrumentId.tsx"),
      route("calls", "routes/admin.calls._index.tsx"),
      route("calls/new", "routes/admin.calls.new.tsx"),
      route("calls/:callId", "routes/admin.calls.$callId.tsx"),
    ]),
    route("*", "routes/$.tsx"),
  ]),
] satisfies RouteConfig;
