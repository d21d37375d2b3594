/** A check's Run button, or while it runs, what it is doing and Cancel. */
export default function RunControl({ running, busyWords, label, onRun, onCancel, testId }: { running: boolean; busyWords: string; label: string; onRun: () => void; onCancel: () => void; testId: string }) {
  return running ? (
    <>
      <span className="text-sm" role="status">
        {busyWords}
      </span>
      <button type="button" className="btn btn-quiet" onClick={onCancel}>
        Cancel
      </button>
    </>
  ) : (
    <button type="button" className="btn btn-primary" onClick={onRun} data-testid={testId}>
      {label}
    </button>
  );
}
