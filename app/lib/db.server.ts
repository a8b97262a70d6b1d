import { Sequelize } from "sequelize";
import { env } from "./env.server";

/**
 * Timeouts, so that a frozen or unreachable MariaDB fails a request within seconds instead of
 * hanging it: `connectTimeout` bounds opening a connection (TCP and handshake), pool `acquire`
 * bounds the wait for a free connection, `queryTimeout` makes the server abort a statement
 * (`max_statement_time`, also lock waits) and `socketTimeout` cuts a connection that gets no
 * answer at all (a frozen server). A migration that needs longer runs
 * `SET SESSION max_statement_time = 0` first.
 */
export const DB_TIMEOUTS = { connectMs: 5_000, acquireMs: 8_000, queryMs: 10_000, socketMs: 12_000 } as const;

// One Sequelize instance for the process.
export const sequelize = new Sequelize({
  dialect: "mariadb",
  host: env.DATABASE_HOST,
  port: env.DATABASE_PORT,
  database: env.DATABASE_NAME,
  username: env.DATABASE_USER,
  password: env.DATABASE_PASSWORD,
  logging: false,
  timezone: "+00:00",
  dialectOptions: {
    connectTimeout: DB_TIMEOUTS.connectMs,
    queryTimeout: DB_TIMEOUTS.queryMs,
    socketTimeout: DB_TIMEOUTS.socketMs,
  },
  // Idle connections leave the pool (10 s) before the socket timeout would cut them.
  pool: { max: 10, min: 0, idle: 10_000, acquire: DB_TIMEOUTS.acquireMs, evict: 1_000 },
  define: { charset: "utf8mb4", collate: "utf8mb4_unicode_ci" },
});
