import type { ButtonHTMLAttributes } from 'react';

export type ButtonVariant = 'primary' | 'secondary' | 'danger' | 'quiet';

const base =
  'inline-flex items-center justify-center gap-2 rounded-md px-3.5 py-2 text-note font-semibold transition-colors ' +
  'disabled:cursor-not-allowed disabled:opacity-55 focus-visible:outline-2 focus-visible:outline-offset-2';

const variants: Record<ButtonVariant, string> = {
  primary: 'bg-phosphor-700 text-white hover:bg-phosphor-800 focus-visible:outline-phosphor-500',
  secondary: 'border border-wafer-300 bg-white text-wafer-800 hover:bg-wafer-50 focus-visible:outline-phosphor-500',
  danger: 'border border-garnet-300 bg-white text-garnet-700 hover:bg-garnet-50 focus-visible:outline-garnet-600',
  quiet: 'text-phosphor-700 hover:bg-phosphor-50 hover:text-phosphor-800 px-2 py-1 focus-visible:outline-phosphor-500',
};

/** Class names for a button-looking element, so router links can share the look. */
export function buttonClass(variant: ButtonVariant = 'primary', extra = ''): string {
  return `${base} ${variants[variant]} ${extra}`.trim();
}

export function Button({ variant = 'primary', className = '', type = 'button', ...rest }: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: ButtonVariant }) {
  return <button type={type} className={buttonClass(variant, className)} {...rest} />;
}
