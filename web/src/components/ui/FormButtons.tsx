import { Button } from './Button';

/** Save and Cancel under a form. */
export function FormButtons({ saveLabel, busy, onCancel }: { saveLabel: string; busy: boolean; onCancel: () => void }) {
  return (
    <div className="flex gap-2">
      <Button type="submit" busy={busy}>
        {saveLabel}
      </Button>
      <Button variant="secondary" onClick={onCancel}>
        Cancel
      </Button>
    </div>
  );
}
