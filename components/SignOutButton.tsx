import { signOutAndLeave } from '@/app/sign-out/actions';

/** A real form (works without JavaScript) that signs out through a server action. */
export function SignOutButton({ className = 'btn btn-quiet' }: { className?: string }) {
  return (
    <form action={signOutAndLeave}>
      <button type="submit" className={className}>
        Sign out
      </button>
    </form>
  );
}
