import { Sequelize } from "sequelize";
import { env } from "./env.server";

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
  dialectOptions: { connectTimeout: 5_000 },
  pool: { max: 10, min: 0, idle: 10_000 },
  define: { charset: "utf8mb4", collate: "utf8mb4_unicode_ci" },
});
