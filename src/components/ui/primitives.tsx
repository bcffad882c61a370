import type { ButtonHTMLAttributes, InputHTMLAttributes, ReactNode, SelectHTMLAttributes } from 'react';
import { useId } from 'react';

type Variant = 'primary' | 'secondary' | 'danger' | 'ghost';
const variants: Record<Variant, string> = {
  primary: 'bg-harbour-800 text-white hover:bg-harbour-700 disabled:bg-harbour-300',
  secondary: 'bg-white text-harbour-800 ring-1 ring-harbour-200 hover:bg-harbour-100 disabled:text-harbour-300',
  danger: 'bg-white text-red-700 ring-1 ring-red-200 hover:bg-red-50',
  ghost: 'text-harbour-700 hover:bg-harbour-100',
};

export function Button({ variant = 'primary', className = '', ...props }: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant }) {
  return (
    <button
      type="button"
      {...props}
      className={`inline-flex items-center justify-center gap-2 rounded-md px-3.5 py-2 text-sm font-medium transition-colors focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-signal-400 disabled:cursor-not-allowed ${variants[variant]} ${className}`}
    />
  );
}

export function TextField({ label, hint, error, ...props }: InputHTMLAttributes<HTMLInputElement> & { label: string; hint?: string; error?: string }) {
  const id = useId();
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-medium text-harbour-800">{label}</label>
      <input
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={error || hint ? `${id}-note` : undefined}
        {...props}
        className="block w-full rounded-md border-0 bg-white px-3 py-2 text-sm text-harbour-900 ring-1 ring-harbour-200 placeholder:text-harbour-300 focus:ring-2 focus:ring-harbour-600 aria-[invalid]:ring-red-400"
      />
      {(error || hint) && (
        <p id={`${id}-note`} className={`text-xs ${error ? 'text-red-700' : 'text-harbour-500'}`}>{error ?? hint}</p>
      )}
    </div>
  );
}

export function SelectField({ label, children, ...props }: SelectHTMLAttributes<HTMLSelectElement> & { label: string }) {
  const id = useId();
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-medium text-harbour-800">{label}</label>
      <select id={id} {...props} className="block w-full rounded-md border-0 bg-white px-3 py-2 text-sm ring-1 ring-harbour-200 focus:ring-2 focus:ring-harbour-600">
        {children}
      </select>
    </div>
  );
}

export function Card({ title, actions, children, className = '' }: { title?: ReactNode; actions?: ReactNode; children: ReactNode; className?: string }) {
  return (
    <section className={`rounded-lg bg-white shadow-sm ring-1 ring-harbour-100 ${className}`}>
      {(title || actions) && (
        <header className="flex items-center justify-between gap-4 border-b border-harbour-100 px-5 py-3">
          <h2 className="text-sm font-semibold text-harbour-800">{title}</h2>
          {actions}
        </header>
      )}
      <div className="p-5">{children}</div>
    </section>
  );
}

export function PageHeader({ title, subtitle, actions }: { title: ReactNode; subtitle?: ReactNode; actions?: ReactNode }) {
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div>
        <h1 className="text-2xl font-semibold tracking-tight text-harbour-900">{title}</h1>
        {subtitle && <p className="mt-1 text-sm text-harbour-500">{subtitle}</p>}
      </div>
      {actions}
    </div>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-harbour-200 px-6 py-10 text-center">
      <p className="font-medium text-harbour-700">{title}</p>
      {children && <div className="mt-1 text-sm text-harbour-500">{children}</div>}
    </div>
  );
}

export function Loading({ what = 'Loading' }: { what?: string }) {
  return (
    <p role="status" className="flex items-center gap-2 py-6 text-sm text-harbour-500">
      <span className="h-2 w-2 animate-pulse rounded-full bg-signal-400" /> {what}…
    </p>
  );
}

export function ErrorNote({ error }: { error: unknown }) {
  const message = error instanceof Error ? error.message : 'Something went wrong.';
  return <p role="alert" className="rounded-md bg-red-50 px-3 py-2 text-sm text-red-800 ring-1 ring-red-200">{message}</p>;
}

export function Badge({ children, tone = 'neutral' }: { children: ReactNode; tone?: 'neutral' | 'signal' | 'good' | 'bad' }) {
  const tones = {
    neutral: 'bg-harbour-100 text-harbour-700',
    signal: 'bg-signal-100 text-signal-800',
    good: 'bg-emerald-50 text-emerald-800',
    bad: 'bg-red-50 text-red-800',
  };
  return <span className={`inline-flex items-center rounded px-2 py-0.5 text-xs font-medium ${tones[tone]}`}>{children}</span>;
}
