// Who may do what. Shared by server guards and the navigation, so a link is shown exactly when
// the page behind it would let the person in.
export const ROLE_NAMES = ['owner', 'manager', 'writer', 'technician'] as const;
export type RoleName = (typeof ROLE_NAMES)[number];

export const ROLE_LABELS: Record<RoleName, string> = {
	owner: 'Owner',
	manager: 'Manager',
	writer: 'Service writer',
	technician: 'Technician'
};

export const STAFF: readonly RoleName[] = ROLE_NAMES;
export const MANAGERS: readonly RoleName[] = ['owner', 'manager'];
/** People at the counter: they check units in and own the customer relationship. */
export const FRONT_DESK: readonly RoleName[] = ['owner', 'manager', 'writer'];
/** People at the bench: they record readings and price repairs. */
export const BENCH: readonly RoleName[] = ['owner', 'manager', 'technician'];

/** Roles a person may invite or remove: owners anyone, managers the floor staff. */
export function manageableRoles(role: RoleName): RoleName[] {
	if (role === 'owner') return [...ROLE_NAMES];
	if (role === 'manager') return ['writer', 'technician'];
	return [];
}

export interface NavItem {
	href: string;
	label: string;
	roles: readonly RoleName[];
}

export const NAV: NavItem[] = [
	{ href: '/home', label: 'Today', roles: STAFF },
	{ href: '/jobs', label: 'Jobs', roles: STAFF },
	{ href: '/customers', label: 'Customers', roles: STAFF },
	{ href: '/catalog', label: 'Catalog', roles: STAFF },
	{ href: '/specs', label: 'Spec sheets', roles: STAFF },
	{ href: '/payments', label: 'Payments', roles: MANAGERS },
	{ href: '/settings', label: 'Settings', roles: MANAGERS },
	{ href: '/reports', label: 'Reports', roles: MANAGERS },
	{ href: '/team', label: 'Team', roles: MANAGERS },
	{ href: '/account', label: 'My account', roles: STAFF }
];

export function navFor(role: RoleName): NavItem[] {
	return NAV.filter((item) => item.roles.includes(role));
}

/** "an owner", "a service writer" — for messages. */
export function roleWithArticle(role: RoleName): string {
	const label = ROLE_LABELS[role].toLowerCase();
	return (/^[aeiou]/.test(label) ? 'an ' : 'a ') + label;
}

export const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
