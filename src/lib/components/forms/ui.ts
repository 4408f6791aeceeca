// Class lists shared by the app's forms, so every input and button looks and focuses alike.
export const inputClass =
	'mt-1 block w-full rounded-md border border-line bg-surface px-3 py-2 text-ink placeholder:text-ink-faint focus:border-brand focus:outline-none aria-[invalid=true]:border-verdict-noncompliant';
export const labelClass = 'block text-sm font-medium text-ink';
export const errorClass = 'mt-1 text-sm text-verdict-noncompliant';
export const buttonClass =
	'inline-flex items-center justify-center rounded-md bg-brand px-4 py-2 text-sm font-medium text-white hover:bg-brand-strong disabled:opacity-60';
export const quietButtonClass =
	'inline-flex items-center justify-center rounded-md border border-line bg-surface px-3 py-1.5 text-sm text-ink hover:bg-raised disabled:opacity-60';
export const cardClass = 'rounded-card border border-line bg-surface p-6';
