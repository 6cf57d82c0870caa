import type { LegendItem } from './metric-views';

export type LegendProps = { items: LegendItem[]; label: string };

const DASH = { dashed: '5 3', dotted: '2 2' } as const;

function Swatch({ item }: { item: LegendItem }) {
  return (
    <svg width="22" height="10" aria-hidden className="shrink-0">
      {item.shape === 'line' ? (
        <line
          x1="1"
          x2="21"
          y1="5"
          y2="5"
          strokeWidth="2"
          strokeDasharray={item.dash ? DASH[item.dash] : undefined}
          className={item.swatch}
        />
      ) : item.shape === 'box' ? (
        <rect x="1" y="1" width="20" height="8" className={item.swatch} />
      ) : (
        <circle cx="11" cy="5" r="4" className={item.swatch} />
      )}
    </svg>
  );
}

/** What the marks of a chart mean, in words; items with more to say explain it on hover and focus. */
export function Legend({ items, label }: LegendProps) {
  return (
    <ul aria-label={label} className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-slate-600 dark:text-slate-300">
      {items.map((item) => (
        <li key={item.label} className="flex items-center gap-1.5">
          <Swatch item={item} />
          {item.title ? (
            <span
              title={item.title}
              tabIndex={0}
              className="cursor-help underline decoration-dotted underline-offset-2"
            >
              {item.label}
              <span className="sr-only">: {item.title}</span>
            </span>
          ) : (
            <span>{item.label}</span>
          )}
        </li>
      ))}
    </ul>
  );
}
