import { Link } from 'react-router-dom';
import { LogoMark } from '../../components/ui/logo.tsx';

export function NotFoundPage({ message = 'There is no page at this address.' }: { message?: string }) {
  return (
    <div className="mx-auto max-w-md px-6 py-20 text-center">
      <LogoMark className="mx-auto h-12 w-12 opacity-80" />
      <h1 className="mt-6 text-xl font-semibold text-harbour-900">Nothing crossed this gate</h1>
      <p className="mt-2 text-sm text-harbour-600">{message}</p>
      <Link to="/" className="mt-6 inline-block text-sm font-medium text-harbour-700 underline underline-offset-4">Back to your lab</Link>
    </div>
  );
}

export function Component() {
  return (
    <div className="min-h-screen">
      <NotFoundPage />
    </div>
  );
}
