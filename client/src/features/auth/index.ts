import type { RouteObject } from 'react-router-dom';
import { AcceptInvitationPage } from './routes/AcceptInvitationPage';
import { ForgotPasswordPage } from './routes/ForgotPasswordPage';
import { ResetPasswordPage } from './routes/ResetPasswordPage';
import { SignInPage } from './routes/SignInPage';

export { useSignOut } from './api/auth';

/** Pages for people who are not signed in. */
export const authRoutes: RouteObject[] = [
  { path: 'sign-in', Component: SignInPage },
  { path: 'forgot-password', Component: ForgotPasswordPage },
  { path: 'reset-password', Component: ResetPasswordPage },
  { path: 'invitations/accept', Component: AcceptInvitationPage },
];
