// Invitations: inviting players, tracking, resend, remind, revoke, automatic reminders, the
// invitation mail and the play-test label sheet.
export { invitationRoutes } from './routes'
