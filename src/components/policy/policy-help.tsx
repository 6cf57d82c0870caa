export type PolicyHelpProps = { level: 'case' | 'project'; readOnly: boolean };

/** What a policy is for, and what it cannot do; shown above every policy form. */
export function PolicyHelp({ level, readOnly }: PolicyHelpProps) {
  return (
    <div className="space-y-1 text-sm text-slate-600 dark:text-slate-300">
      <p>
        {level === 'case'
          ? "These settings apply to this case only and sit on the project's default policy. An empty field inherits; the hint below it says from where."
          : "The project's default policy: every case starts from it, and a case's own settings win. An empty field keeps the built-in default shown below it."}
      </p>
      <p className="font-medium text-slate-800 dark:text-slate-100">
        Loosening a policy cannot make a solver right: a pass does not validate the physics. It only means the snapshots
        showed none of the oscillation, bound violations or drift this policy looks for; accuracy and convergence need
        tests of their own.
      </p>
      {readOnly ? <p>You can read this policy; maintainers of the workspace change it.</p> : null}
    </div>
  );
}
