import type { Role, SessionUser } from '../auth/types';
import { UploadError } from './errors';

/** Who may upload past runs and attach documents. Everyone signed in may read documents. */
export const UPLOAD_ROLES: readonly Role[] = ['engineer', 'supervisor', 'admin'];

/** For API endpoints: the user if they may write uploads, else a 401/403 UploadError. */
export function uploader(locals: App.Locals): SessionUser {
	const user = locals.user;
	if (!user) throw new UploadError(403, 'unauthenticated', 'Sign in first.');
	if (!UPLOAD_ROLES.includes(user.role)) throw new UploadError(403, 'forbidden', `This needs the ${UPLOAD_ROLES.join(', ')} role; you are signed in as ${user.role}.`);
	return user;
}
