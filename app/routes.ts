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
        index("routes/proposals.$proposalId._index.tsx"),
        route("team", "routes/proposals.$proposalId.team.tsx"),
        route("targets", "routes/proposals.$proposalId.targets.tsx"),
        route("observations", "routes/proposals.$proposalId.observations.tsx"),
        route("feasibility", "routes/proposals.$proposalId.feasibility.tsx"),
        route("science-case", "routes/proposals.$proposalId.science-case.tsx"),
        route("history", "routes/proposals.$proposalId.history.tsx"),
        route("submit", "routes/proposals.$proposalId.submit.tsx"),
      ]),
    ]),
    ...prefix("admin", [
      index("routes/admin._index.tsx"),
      route("users", "routes/admin.users.tsx"),
    ]),
    route("*", "routes/$.tsx"),
  ]),
] satisfies RouteConfig;
