import { changedFields } from './audit-log';

describe('changedFields', () => {
  it('should list only the fields whose values differ', () => {
    expect(
      changedFields({
        before: { name: 'Dora Linnet', role: 'member', status: 'active' },
        after: { name: 'Dora Linnet', role: 'member', status: 'deactivated' },
      }),
    ).toEqual([{ field: 'status', before: 'active', after: 'deactivated' }]);
  });

  it('should show a created record as changes from nothing', () => {
    expect(changedFields({ before: null, after: { role: 'planner', farmId: null } })).toEqual([
      { field: 'role', before: '(none)', after: 'planner' },
      { field: 'farmId', before: '(none)', after: 'null' },
    ]);
  });
});
