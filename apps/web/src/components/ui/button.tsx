import { forwardRef, type ButtonHTMLAttributes } from 'react';
import { LoaderCircle } from 'lucide-react';

type Variant = 'primary' | 'secondary' | 'ghost' | 'danger';
const styles: Record<Variant, string> = {
  primary: 'bg-copper text-white hover:bg-copper-hover disabled:bg-slate',
  secondary: 'bg-white text-ink border border-slate-line hover:bg-slate-faint',
  ghost: 'bg-transparent text-ink hover:bg-slate-faint',
  danger: 'bg-alarm text-white hover:brightness-90',
};

export interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: Variant;
  busy?: boolean;
  size?: 'md' | 'lg' | 'sm';
}

export const Button = forwardRef<HTMLButtonElement, ButtonProps>(function Button(
  { variant = 'primary', busy = false, size = 'md', className = '', children, disabled, type = 'button', ...rest },
  ref,
) {
  const sizing = size === 'lg' ? 'min-h-12 px-5 text-base' : size === 'sm' ? 'min-h-9 px-3 text-sm' : 'min-h-11 px-4 text-sm';
  return (
    <button
      ref={ref}
      type={type}
      disabled={disabled || busy}
      aria-busy={busy || undefined}
      className={`inline-flex items-center justify-center gap-2 rounded-md font-medium transition-colors disabled:cursor-not-allowed disabled:opacity-70 ${sizing} ${styles[variant]} ${className}`}
      {...rest}
    >
      {busy && <LoaderCircle className="size-4 animate-spin" aria-hidden="true" />}
      {children}
    </button>
  );
});
