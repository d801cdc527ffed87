export const ROLES = ['technician', 'supervisor', 'engineer', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export interface SessionUser {
	id: string;
	email: string;
	name: string;
	role: Role;
}
