import { createAccessControl } from 'better-auth/plugins/access';
import { adminAc, defaultStatements } from 'better-auth/plugins/admin/access';

// better-auth's admin plugin knows our four roles; only `admin` may manage users.
export const accessControl = createAccessControl(defaultStatements);

export const authRoles = {
	admin: accessControl.newRole({ ...adminAc.statements }),
	supervisor: accessControl.newRole({ user: [], session: [] }),
	engineer: accessControl.newRole({ user: [], session: [] }),
	technician: accessControl.newRole({ user: [], session: [] })
};
