// Pages for accounts: sign-up, sign-in, e-mail verification, password reset, the account itself.
// Mail links point at /verify?token=… and /reset?token=… (server/services build them from PUBLIC_URL).
import type { RouteRecordRaw } from 'vue-router';

export const authRoutes: RouteRecordRaw[] = [
  { path: '/sign-in', name: 'sign-in', component: () => import('@app/views/SignInPage.vue'), meta: { guestOnly: true, title: 'Sign in' } },
  { path: '/sign-up', name: 'sign-up', component: () => import('@app/views/SignUpPage.vue'), meta: { guestOnly: true, title: 'Create an account' } },
  { path: '/verify', name: 'verify-email', component: () => import('@app/views/VerifyEmailPage.vue'), meta: { title: 'Confirm your e-mail' } },
  { path: '/forgot-password', name: 'request-reset', component: () => import('@app/views/RequestResetPage.vue'), meta: { title: 'Reset your password' } },
  { path: '/reset', name: 'reset-password', component: () => import('@app/views/ResetPasswordPage.vue'), meta: { title: 'Choose a new password' } },
  { path: '/account', name: 'account', component: () => import('@app/views/AccountPage.vue'), meta: { auth: true, title: 'Your account' } },
];
