import type { Metadata } from 'next';
import { MailingLists } from '@/src/components/notifications/mailing-lists';
import { SubscriptionForm } from '@/src/components/notifications/subscription-form';
import { formatDateTime } from '@/src/components/settings/format';
import { SettingsHeader } from '@/src/components/settings/settings-header';
import { Card } from '@/src/components/ui/card';
import { requireMember } from '@/src/server/auth/session';
import { getNotificationSettings, memberFrom } from '@/src/server/services/notifications';
import { removeMailingListAction, saveMailingListAction, saveMySubscriptionAction, sendPreviewAction } from './actions';

export const metadata: Metadata = { title: 'Notifications' };
export const dynamic = 'force-dynamic';

const TIME_ZONE_LIST = 'notification-time-zones';

function timeZones(): string[] {
  const zones = Intl.supportedValuesOf('timeZone');
  return zones.includes('UTC') ? zones : ['UTC', ...zones];
}

/** Every member sets their own mails; maintainers also manage the projects' mailing lists. */
export default async function NotificationsPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace } = await params;
  const ctx = await requireMember(workspace, 'viewer');
  const view = await getNotificationSettings(memberFrom(ctx));
  const lists = view.projects.flatMap((p) =>
    p.mailingLists.map((l) => ({
      id: l.id,
      email: l.email,
      projectName: p.project.name,
      weeklyDigest: l.weeklyDigest,
      failureAlerts: l.failureAlerts,
      digestDay: l.digestDay,
      digestHour: l.digestHour,
      timeZone: l.timeZone,
    })),
  );
  return (
    <div className="space-y-6">
      <SettingsHeader title="Notifications">
        Mail to {ctx.user.email} about the projects of {ctx.workspace.name}: a weekly digest at the day and hour you
        choose, in your time zone, and an alert when a case starts failing. Every mail has an unsubscribe link that
        works without signing in.
      </SettingsHeader>
      <datalist id={TIME_ZONE_LIST}>
        {timeZones().map((z) => (
          <option key={z} value={z} />
        ))}
      </datalist>
      {view.projects.length === 0 ? (
        <Card title="Your mail">
          <p className="text-sm text-slate-500">This workspace has no project yet.</p>
        </Card>
      ) : (
        view.projects.map((p) => (
          <SubscriptionForm
            key={p.project.id}
            workspace={ctx.workspace.slug}
            project={p.project}
            current={
              p.mine
                ? {
                    weeklyDigest: p.mine.weeklyDigest,
                    failureAlerts: p.mine.failureAlerts,
                    digestDay: p.mine.digestDay,
                    digestHour: p.mine.digestHour,
                    timeZone: p.mine.timeZone,
                  }
                : null
            }
            timeZoneListId={TIME_ZONE_LIST}
            save={saveMySubscriptionAction}
            preview={sendPreviewAction}
          />
        ))
      )}
      <MailingLists
        workspace={ctx.workspace.slug}
        projects={view.projects.map((p) => ({ id: p.project.id, name: p.project.name }))}
        lists={lists}
        canManage={view.canManageMailingLists}
        timeZoneListId={TIME_ZONE_LIST}
        save={saveMailingListAction}
        remove={removeMailingListAction}
      />
      <Card title="Recent mail to you">
        {view.recent.length === 0 ? (
          <p className="text-sm text-slate-500">Nothing sent yet.</p>
        ) : (
          <table className="w-full text-left text-sm" data-testid="delivery-log">
            <thead className="text-xs uppercase tracking-wide text-slate-500">
              <tr>
                <th className="py-1 pr-3 font-medium">When</th>
                <th className="py-1 pr-3 font-medium">Kind</th>
                <th className="py-1 pr-3 font-medium">Subject</th>
                <th className="py-1 font-medium">Status</th>
              </tr>
            </thead>
            <tbody>
              {view.recent.map((d) => (
                <tr key={d.id} className="border-t border-slate-100 align-top dark:border-slate-800">
                  <td className="py-1.5 pr-3 whitespace-nowrap">{formatDateTime(d.sentAt ?? d.createdAt)}</td>
                  <td className="py-1.5 pr-3">{d.kind}</td>
                  <td className="py-1.5 pr-3">{d.subject}</td>
                  <td className="py-1.5">
                    {d.status}
                    {d.status !== 'sent' && d.lastError ? (
                      <span className="block text-xs text-slate-500">{d.lastError}</span>
                    ) : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Card>
      <p className="text-xs text-slate-500">
        A pass in these mails means the snapshots showed no spurious oscillation, bound violation or drift under the
        case policy; it does not validate the physics, the accuracy or the convergence of the solver.
      </p>
    </div>
  );
}
