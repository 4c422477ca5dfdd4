/** A trigger level shown by shape, text and colour together (never colour alone). */
const SHAPE: Record<string, string> = { review: "◆", alert: "▲", limit: "■" };

export function LevelBadge({ level, count }: { level: string; count?: number }) {
  return (
    <span className={`level level-${level}`} data-level={level}>
      <span aria-hidden="true">{SHAPE[level] ?? "●"}</span> {level}
      {count !== undefined ? <strong> {count}</strong> : null}
    </span>
  );
}
