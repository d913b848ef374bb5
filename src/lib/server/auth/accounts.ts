// Auth.js never creates an account: its adapter's createUser refuses with this message
// (src/auth.ts), so a sign-in link never makes a person without a shop. Accounts come into being
// only through `createUser` in services/accounts.ts, called by the shop sign-up, the operator's
// `npm run shop:create` and the acceptance of an invitation.
export const NO_ACCOUNT_CREATION = 'Accounts are created only by accepting an invitation, by the shop sign-up or by an operator.';
