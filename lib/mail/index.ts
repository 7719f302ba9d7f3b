/** Gridproof's mail: settings, transport, local development server, templates and the outbox. */
export { APP_NAME, mailConfigFromEnv, type MailConfig } from './config';
export { createMailer, type Mailer, type MailTransport, type OutgoingMessage } from './transport';
export { startLocalSmtp, ensureLocalSmtp, listLocalMail, getLocalMail, type LocalMail, type LocalMailFull, type LocalSmtpServer } from './local-smtp';
export { reportMail, invitationMail, passwordResetMail, MAIL_KINDS, type MailContent, type MailKind, type ReportMailInput, type InvitationMailInput, type PasswordResetMailInput } from './templates';
export { deliverPendingMail, runMailDelivery, queueMail, type DeliverOptions, type DeliverResult } from './outbox';
export { escapeHtml } from './html';
export { renderDeviationMapSvg, renderDeviationMapPng, type MapImageOptions } from './map-image';
export { reportMailFromReport, type ReportMailFromReportInput } from './compose';
