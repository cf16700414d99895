import { http } from './http';
import type {
  AppSettings,
  ChangePasswordBody,
  CreateUserBody,
  SessionAnswer,
  SignInBody,
  SignUpBody,
  UpdateUserBody,
  User,
} from '../../shared/schemas/user';

/** Sign-in, sign-up and account calls. */
export const authApi = {
  options: () => http.get<{ signupOpen: boolean }>('/auth/options'),
  signIn: (body: SignInBody) => http.post<SessionAnswer>('/auth/sign-in', body),
  signUp: (body: SignUpBody) => http.post<SessionAnswer>('/auth/sign-up', body),
  refresh: () => http.post<SessionAnswer>('/auth/refresh'),
  signOut: () => http.post<void>('/auth/sign-out'),
  changePassword: (body: ChangePasswordBody) => http.post<SessionAnswer>('/auth/password', body),
  requestReset: (email: string) => http.post<{ sent: true }>('/auth/password-reset', { email }),
  confirmReset: (token: string, newPassword: string) =>
    http.post<void>('/auth/password-reset/confirm', { token, newPassword }),
};

/** The admin's account calls. */
export const usersApi = {
  list: () => http.get<User[]>('/users'),
  create: (body: CreateUserBody) => http.post<User>('/users', body),
  update: (id: string, body: UpdateUserBody) => http.patch<User>(`/users/${encodeURIComponent(id)}`, body),
  settings: () => http.get<AppSettings & { signupByConfig: boolean }>('/settings'),
  saveSettings: (body: AppSettings) => http.put<AppSettings & { signupByConfig: boolean }>('/settings', body),
};
