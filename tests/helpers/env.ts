// Values the test runner (tests/run.ts) put into the environment.
function need(name: string) {
  const value = process.env[name];
  if (!value) throw new Error(`${name} is not set: run the tests with \`npm test\`, which starts the services.`);
  return value;
}

export const testEnv = {
  appUrl: need("APP_URL"),
  appPort: Number(need("PORT")),
  maildevUrl: `http://127.0.0.1:${need("MAILDEV_WEB_PORT")}`,
  smtpPort: Number(need("SMTP_PORT")),
  paymentsUrl: `http://127.0.0.1:${need("STRIPE_API_PORT")}`,
  buildDir: need("NIGHTSHARE_BUILD_DIR"),
};
