import type { Role } from '@/src/server/auth/roles';
import { Card } from '../ui/card';

export type RoleGuideProps = { descriptions: Record<Role, string>; current: Role };

/** What each role may do, with the reader's own role marked. */
export function RoleGuide({ descriptions, current }: RoleGuideProps) {
  return (
    <Card title="Roles">
      <dl className="grid gap-2 text-sm sm:grid-cols-[8rem_1fr]">
        {(Object.entries(descriptions) as [Role, string][]).map(([role, text]) => (
          <div key={role} className="contents">
            <dt className="font-medium">
              {role}
              {role === current ? <span className="ml-1 text-xs font-normal text-slate-500">(you)</span> : null}
            </dt>
            <dd className="text-slate-600 dark:text-slate-300">{text}</dd>
          </div>
        ))}
      </dl>
    </Card>
  );
}
