/** Fixed local ports of the development set-up; tests pick free ports instead. */
export const devPorts = {
  postgres: Number(process.env.VARIGATE_PG_PORT ?? 54329),
  s3: Number(process.env.VARIGATE_S3_PORT ?? 4569),
  smtp: Number(process.env.VARIGATE_SMTP_PORT ?? 2525),
  mailHttp: Number(process.env.VARIGATE_MAIL_HTTP_PORT ?? 2526),
  app: Number(process.env.PORT ?? 3000),
};
