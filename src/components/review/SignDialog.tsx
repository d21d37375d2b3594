import { useEffect, useRef } from 'react';
import { useForm } from 'react-hook-form';
import { z } from '../../lib/analysis/zod';
import { MEANING_WORDS, STEP_WORDS, type ReviewStep } from '../../lib/client/review/actions';
import { useReviewStep } from '../../lib/client/review/api';

const SignForm = z.object({
  password: z.string().min(1, 'Enter your password to sign.').max(1024),
  reason: z.string().max(2000, 'At most 2000 characters.'),
});
type SignFormT = z.infer<typeof SignForm>;

export default function SignDialog({ step, version, me, onClose, sessionId }: { step: ReviewStep; version: number; me: { name: string }; onClose: () => void; sessionId: string }) {
  const ref = useRef<HTMLDialogElement>(null);
  const mutation = useReviewStep(sessionId);
  const { register, handleSubmit, formState, setError } = useForm<SignFormT>({ defaultValues: { password: '', reason: '' } });
  useEffect(() => {
    ref.current?.showModal();
  }, []);
  const meaning = step === 'return' ? 'returned' : step === 'signOff' ? 'approved' : 'reviewed';
  const submit = handleSubmit(async (values) => {
    const parsed = SignForm.safeParse(values);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) setError(issue.path[0] as keyof SignFormT, { message: issue.message });
      return;
    }
    if (step === 'return' && values.reason.trim() === '') return setError('reason', { message: 'Say why the session goes back.' });
    try {
      await mutation.mutateAsync({ step, recipeVersion: version, password: values.password, ...(step === 'return' ? { reason: values.reason.trim() } : {}) });
      onClose();
    } catch {
      // shown below from mutation.error
    }
  });
  return (
    <dialog ref={ref} className="card m-auto max-w-lg backdrop:bg-ink/40" aria-labelledby="sign-title" onClose={onClose} data-testid="sign-dialog">
      <form onSubmit={submit} className="grid gap-3">
        <h2 id="sign-title" className="text-lg font-semibold">
          {STEP_WORDS[step]}: recipe version {version}
        </h2>
        <p className="text-sm">
          You sign as <strong>{me.name}</strong>. The record keeps your printed name, the time, the meaning “{MEANING_WORDS[meaning]}” and a SHA-256 of exactly this recipe version and its summary.
        </p>
        {step === 'signOff' && (
          <p className="notice text-sm">Tidemark is a research tool, not a medical device: signing off approves the analysis for research use, not for diagnosis or treatment.</p>
        )}
        {step === 'return' && (
          <label className="field">
            <span>Why it goes back</span>
            <textarea rows={3} {...register('reason')} />
            {formState.errors.reason && <span className="field-error">{formState.errors.reason.message}</span>}
          </label>
        )}
        <label className="field">
          <span>Your password, again</span>
          <input type="password" autoComplete="current-password" {...register('password')} />
          {formState.errors.password && <span className="field-error">{formState.errors.password.message}</span>}
        </label>
        {mutation.error && (
          <p className="notice notice-warn" role="alert" data-testid="sign-problem">
            {mutation.error.message}
          </p>
        )}
        <div className="flex gap-2">
          <button type="submit" className="btn btn-primary" disabled={mutation.isPending}>
            {mutation.isPending ? 'Signing…' : STEP_WORDS[step]}
          </button>
          <button type="button" className="btn btn-quiet" onClick={() => ref.current?.close()}>
            Cancel
          </button>
        </div>
      </form>
    </dialog>
  );
}
