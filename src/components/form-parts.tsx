/** Shared class names so every form on the team and account pages looks alike. */
export const inputClass =
  'mt-1 w-full border-2 border-ink bg-paper px-3 py-2 font-mono text-sm focus:outline-none focus:border-verdigris aria-[invalid=true]:border-sienna';
export const labelClass = 'block text-sm font-semibold';
export const primaryButton = 'bg-ink text-paper px-4 py-2 text-sm font-semibold hover:bg-verdigris-deep disabled:opacity-60';
export const secondaryButton = 'border-2 border-ink px-3 py-1 text-sm font-semibold hover:bg-paper-deep disabled:opacity-60';
export const dangerButton = 'border-2 border-sienna text-sienna px-3 py-1 text-sm font-semibold hover:bg-sienna hover:text-paper disabled:opacity-60';
export const fieldErrorClass = 'mt-1 block text-xs text-sienna';
export const formErrorClass = 'text-sm text-sienna border-l-4 border-sienna pl-3';

/** A field's error message, announced to screen readers. */
export function FieldError({ id, message }: { id: string; message?: string }) {
  return message ? (
    <span id={id} className={fieldErrorClass} role="alert">
      {message}
    </span>
  ) : null;
}

/** A field for choosing a password, with the length hint and its error; ids derive from the field name. */
export function NewPasswordField({ label, name, error }: { label: string; name: string; error?: string }) {
  return (
    <label className={labelClass}>
      {label}
      <input
        name={name}
        type="password"
        autoComplete="new-password"
        className={inputClass}
        aria-invalid={!!error}
        aria-describedby={`${name}-hint ${name}-error`}
      />
      <span id={`${name}-hint`} className="mt-1 block text-xs font-normal text-graphite">
        At least 10 characters; a few unrelated words make a strong one.
      </span>
      <FieldError id={`${name}-error`} message={error} />
    </label>
  );
}

/** An error that belongs to the whole form rather than one field. */
export function FormError({ message }: { message?: string }) {
  return message ? (
    <p className={formErrorClass} role="alert">
      {message}
    </p>
  ) : null;
}
