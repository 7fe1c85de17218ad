import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'secondary' | 'quiet' | 'danger';

const variants: Record<Variant, string> = {
  primary: 'bg-ink-900 text-paper hover:bg-ink-700 disabled:bg-ink-300',
  secondary: 'bg-white text-ink-900 ring-1 ring-ink-200 hover:bg-ink-50 disabled:text-ink-300',
  quiet: 'text-ink-700 hover:bg-ink-50 disabled:text-ink-300',
  danger: 'bg-coral-500 text-white hover:brightness-95 disabled:opacity-50',
};

export function Button({
  variant = 'primary',
  className = '',
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant }) {
  return (
    <button
      type="button"
      className={`inline-flex items-center justify-center gap-2 rounded-md px-3.5 py-2 text-sm font-semibold transition-colors disabled:cursor-not-allowed ${variants[variant]} ${className}`}
      {...props}
    />
  );
}
