import type { RouteObject } from 'react-router-dom';

export { useSignOut } from './api/auth';

/** Pages for people who are not signed in. Each page loads when first opened. */
export const authRoutes: RouteObject[] = [
  { path: 'sign-in', lazy: async () => ({ Component: (await import('./routes/SignInPage')).SignInPage }) },
  { path: 'forgot-password', lazy: async () => ({ Component: (await import('./routes/ForgotPasswordPage')).ForgotPasswordPage }) },
  { path: 'reset-password', lazy: async () => ({ Component: (await import('./routes/ResetPasswordPage')).ResetPasswordPage }) },
  { path: 'invitations/accept', lazy: async () => ({ Component: (await import('./routes/AcceptInvitationPage')).AcceptInvitationPage }) },
];
