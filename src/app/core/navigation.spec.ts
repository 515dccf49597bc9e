import { ROLES } from '../../../shared/roles';
import { NAV_ITEMS, navItemsFor } from './navigation';

describe('navItemsFor', () => {
  it('should give nobody a menu before sign-in', () => {
    expect(navItemsFor(null, { devMail: true })).toEqual([]);
  });

  it('should give every role home and account', () => {
    for (const role of ROLES) {
      const paths = navItemsFor(role, { devMail: false }).map((i) => i.path);
      expect(paths).toContain('/');
      expect(paths).toContain('/account');
    }
  });

  it('should keep user administration and settings to admins', () => {
    for (const role of ['planner', 'treasurer', 'member'] as const) {
      const paths = navItemsFor(role, { devMail: true }).map((i) => i.path);
      expect(paths).not.toContain('/admin/users');
      expect(paths).not.toContain('/admin/settings');
      expect(paths).not.toContain('/admin/mail');
    }
  });

  it('should list each path once', () => {
    const paths = NAV_ITEMS.map((i) => i.path);
    expect(new Set(paths).size).toBe(paths.length);
  });
});
