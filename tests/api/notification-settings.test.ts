import { beforeAll, describe, expect, it } from 'vitest';
import { mailingListSchema, mySubscriptionSchema } from '@/src/schemas/notifications';
import { insertUser } from '@/src/server/queries/users';
import {
  getNotificationSettings,
  removeMailingList,
  saveMailingList,
  saveMySubscription,
  type Member,
} from '@/src/server/services/notifications';
import { createTestProject, type TestProject } from '../support/api';
import { uniqueAddress } from '../support/notifications';

describe('notification settings (services behind the settings page)', () => {
  let project: TestProject;
  let other: TestProject;
  let viewer: Member;
  let maintainer: Member;

  beforeAll(async () => {
    project = await createTestProject('settings-flow');
    other = await createTestProject('elsewhere');
    const v = await insertUser({ email: uniqueAddress('viewer') });
    const m = await insertUser({ email: uniqueAddress('maintainer') });
    viewer = { workspaceId: project.workspaceId, userId: v.id, email: v.email, role: 'viewer' };
    maintainer = { workspaceId: project.workspaceId, userId: m.id, email: m.email, role: 'maintainer' };
  });

  it('parses the form: checkboxes, numbers as text, and refuses an unknown time zone with a readable message', () => {
    const ok = mySubscriptionSchema.safeParse({
      projectId: project.projectId,
      weeklyDigest: 'on',
      digestDay: '3',
      digestHour: '9',
      timeZone: 'Europe/Oslo',
    });
    expect(ok.success && ok.data).toEqual({
      projectId: project.projectId,
      weeklyDigest: true,
      failureAlerts: false,
      digestDay: 3,
      digestHour: 9,
      timeZone: 'Europe/Oslo',
    });
    const bad = mySubscriptionSchema.safeParse({
      projectId: project.projectId,
      digestDay: '7',
      digestHour: '24',
      timeZone: 'Atlantis/Capital',
    });
    expect(bad.success).toBe(false);
    const paths = bad.error!.issues.map((i) => [i.path.join('.'), i.message]);
    expect(paths).toEqual(
      expect.arrayContaining([
        ['digestDay', 'Pick a day of the week'],
        ['digestHour', 'Pick an hour from 0 to 23'],
        ['timeZone', 'Unknown time zone; use a name like Europe/Oslo or America/Halifax'],
      ]),
    );
    expect(
      mailingListSchema.safeParse({
        projectId: project.projectId,
        email: 'not an address',
        digestDay: 1,
        digestHour: 8,
        timeZone: 'UTC',
      }).success,
    ).toBe(false);
  });

  it('lets any member save their own digest and alert settings, and shows them back', async () => {
    const saved = await saveMySubscription(viewer, {
      projectId: project.projectId,
      weeklyDigest: true,
      failureAlerts: true,
      digestDay: 3,
      digestHour: 9,
      timeZone: 'Europe/Oslo',
    });
    expect(saved).toMatchObject({
      userId: viewer.userId,
      email: viewer.email,
      weeklyDigest: true,
      failureAlerts: true,
      digestDay: 3,
      digestHour: 9,
      timeZone: 'Europe/Oslo',
    });
    // Saving again updates the same row (off = both switches off).
    const off = await saveMySubscription(viewer, {
      projectId: project.projectId,
      weeklyDigest: false,
      failureAlerts: false,
      digestDay: 3,
      digestHour: 9,
      timeZone: 'Europe/Oslo',
    });
    expect(off.id).toBe(saved.id);
    const view = await getNotificationSettings(viewer);
    const row = view.projects.find((p) => p.project.id === project.projectId)!;
    expect(row.mine).toMatchObject({ id: saved.id, weeklyDigest: false, failureAlerts: false });
    expect(view.canManageMailingLists).toBe(false);
  });

  it('refuses a project of another workspace as if it did not exist', async () => {
    await expect(
      saveMySubscription(viewer, {
        projectId: other.projectId,
        weeklyDigest: true,
        failureAlerts: false,
        digestDay: 1,
        digestHour: 8,
        timeZone: 'UTC',
      }),
    ).rejects.toMatchObject({ code: 'not_found:project' });
  });

  it('lets maintainers, not viewers, subscribe and remove a mailing-list address', async () => {
    const list = uniqueAddress('estuary-team');
    const input = {
      projectId: project.projectId,
      email: list,
      weeklyDigest: true,
      failureAlerts: true,
      digestDay: 1,
      digestHour: 7,
      timeZone: 'UTC',
    };
    await expect(saveMailingList(viewer, input)).rejects.toMatchObject({ code: 'forbidden:role' });
    const saved = await saveMailingList(maintainer, input);
    expect(saved).toMatchObject({ userId: null, email: list, failureAlerts: true });
    const view = await getNotificationSettings(maintainer);
    expect(view.canManageMailingLists).toBe(true);
    expect(view.projects.find((p) => p.project.id === project.projectId)!.mailingLists.map((l) => l.email)).toEqual([
      list,
    ]);
    await expect(removeMailingList(viewer, saved.id)).rejects.toMatchObject({ code: 'forbidden:role' });
    await removeMailingList(maintainer, saved.id);
    expect(
      (await getNotificationSettings(maintainer)).projects.find((p) => p.project.id === project.projectId)!
        .mailingLists,
    ).toEqual([]);
  });

  it("does not let a mailing-list entry take over a member's own subscription, nor the reverse", async () => {
    await saveMySubscription(maintainer, {
      projectId: project.projectId,
      weeklyDigest: true,
      failureAlerts: false,
      digestDay: 1,
      digestHour: 8,
      timeZone: 'UTC',
    });
    await expect(
      saveMailingList(maintainer, {
        projectId: project.projectId,
        email: maintainer.email,
        weeklyDigest: true,
        failureAlerts: false,
        digestDay: 1,
        digestHour: 8,
        timeZone: 'UTC',
      }),
    ).rejects.toMatchObject({ code: 'conflict:subscription' });
    // A member's own row cannot be removed as if it were a mailing list.
    const mine = (await getNotificationSettings(maintainer)).projects.find(
      (p) => p.project.id === project.projectId,
    )!.mine!;
    await expect(removeMailingList(maintainer, mine.id)).rejects.toMatchObject({ code: 'not_found:subscription' });
  });
});
