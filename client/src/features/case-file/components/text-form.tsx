import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { Button } from '@/components/ui/button';
import { TextareaField } from '@/components/ui/textarea-field';
import { plainErrors, serverProblem } from '../utils/form-errors';

/**
 * A form of one text field checked by a shared schema (a note, a reason).
 * `onSubmit` resolves when the server took it; the field then empties.
 */
export function TextForm({
  label,
  hint,
  schema,
  submitLabel,
  pendingLabel,
  onSubmit,
  rows = 3,
  disabled,
  textareaRef,
  extraButtons,
  submitVariant = 'secondary',
}: {
  label: string;
  hint?: string;
  schema: z.ZodType<string, string>;
  submitLabel: string;
  pendingLabel: string;
  onSubmit: (text: string) => Promise<unknown>;
  rows?: number;
  disabled?: boolean;
  textareaRef?: (element: HTMLTextAreaElement | null) => void;
  extraButtons?: React.ReactNode;
  /** primary for the one action a dialog exists for. */
  submitVariant?: 'primary' | 'secondary';
}) {
  const formSchema = z.object({ text: schema });
  const {
    register,
    handleSubmit,
    reset,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<{ text: string }>({ resolver: zodResolver(formSchema, { error: plainErrors }), defaultValues: { text: '' } });
  const field = register('text');

  const submit = handleSubmit(async ({ text }) => {
    try {
      await onSubmit(text);
      reset({ text: '' });
    } catch (error) {
      setError('root', { message: serverProblem(error) });
    }
  });

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-2">
      <TextareaField
        label={label}
        hint={hint}
        rows={rows}
        error={errors.text?.message}
        disabled={disabled}
        {...field}
        ref={(element) => {
          field.ref(element);
          textareaRef?.(element);
        }}
      />
      {errors.root && (
        <p role="alert" className="text-xs text-danger">
          {errors.root.message}
        </p>
      )}
      <div className="flex flex-wrap items-center gap-2">
        <Button size="sm" type="submit" variant={submitVariant} disabled={disabled || isSubmitting}>
          {isSubmitting ? pendingLabel : submitLabel}
        </Button>
        {extraButtons}
      </div>
    </form>
  );
}
