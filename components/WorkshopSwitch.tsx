'use client';
/** Lets a member of several workshops choose where to act (POST /api/auth/workshop). */
import { useMutation } from '@tanstack/react-query';
import { useRouter } from 'next/navigation';
import { api } from './api';

export function WorkshopSwitch({ current, workshops }: { current: string; workshops: { workshopId: string; name: string }[] }) {
  const router = useRouter();
  const m = useMutation({
    mutationFn: (workshopId: string) => api('/api/auth/workshop', { body: { workshopId } }),
    onSuccess: () => {
      router.refresh();
    },
  });
  if (workshops.length < 2) return <span className="font-bold">{workshops.find((w) => w.workshopId === current)?.name}</span>;
  return (
    <label className="flex items-center gap-2">
      <span className="sr-only">Workshop</span>
      <select className="input min-w-40 py-1" value={current} disabled={m.isPending} onChange={(e) => m.mutate(e.target.value)}>
        {workshops.map((w) => (
          <option key={w.workshopId} value={w.workshopId}>
            {w.name}
          </option>
        ))}
      </select>
    </label>
  );
}
