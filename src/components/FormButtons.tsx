/** A form's two buttons: the action (disabled while it runs) and the way out of it. */
export default function FormButtons({
  action,
  cancel = 'Cancel',
  onCancel,
  busy = false,
  className = 'flex gap-2',
}: {
  action: string;
  cancel?: string;
  onCancel: () => void;
  busy?: boolean;
  className?: string;
}) {
  return (
    <div className={className}>
      <button type="submit" className="btn-primary" disabled={busy}>
        {action}
      </button>
      <button type="button" className="btn-quiet" onClick={onCancel}>
        {cancel}
      </button>
    </div>
  );
}
