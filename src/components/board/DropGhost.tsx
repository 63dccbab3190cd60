/** Where a dragged run or wash would land: still, day and time, and the warnings it would raise there. */
import { dayAndTime, dropGhostBox } from '../../lib/board';
import type { DragPreview } from './hooks/useRunDrag';
import { WarningBadges } from './WarningBadges';

export function DropGhost(p: { preview: DragPreview; row: number; windowStart: Date; pxPerHour: number; stillName: string; timeZone: string }) {
  const { preview } = p;
  return (
    <div className="drop-ghost" data-testid="drop-preview" style={dropGhostBox(preview, p.row, p.windowStart, p.pxPerHour)}>
      <span className="drop-ghost-label">
        <span className="drop-ghost-time">
          {p.stillName}, {dayAndTime(preview.startsAt, p.timeZone)}
        </span>
        <WarningBadges warnings={preview.warnings} />
        {preview.warnings.filter((w) => w.severity !== 'info').length === 0 && <span className="text-xs">no warnings</span>}
      </span>
    </div>
  );
}
