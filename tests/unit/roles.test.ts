import { describe, expect, it } from 'vitest';
import { manageableRoles, navFor, roleWithArticle } from '../../src/lib/roles';

describe('roles', () => {
	it('owners manage everyone, managers the floor staff, others nobody', () => {
		expect(manageableRoles('owner')).toEqual(['owner', 'manager', 'writer', 'technician']);
		expect(manageableRoles('manager')).toEqual(['writer', 'technician']);
		expect(manageableRoles('writer')).toEqual([]);
		expect(manageableRoles('technician')).toEqual([]);
	});

	it('the team link is shown to owners and managers only', () => {
		expect(navFor('owner').map((n) => n.href)).toContain('/team');
		expect(navFor('technician').map((n) => n.href)).not.toContain('/team');
	});

	it('messages read naturally', () => {
		expect(roleWithArticle('owner')).toBe('an owner');
		expect(roleWithArticle('writer')).toBe('a service writer');
	});
});
