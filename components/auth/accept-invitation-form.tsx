'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'next/navigation';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Button } from '@/components/ui/button';
import { Field } from '@/components/ui/field';
import { Input } from '@/components/ui/input';
import { fetchJson } from '@/lib/hooks/fetch-json';
import { acceptInvitationSchema, type AcceptInvitationInput } from '@/lib/validation/auth';

export function AcceptInvitationForm({ token }: { token: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const form = useForm<AcceptInvitationInput>({ resolver: zodResolver(acceptInvitationSchema), defaultValues: { token, password: '', confirm: '' } });
  const { errors, isSubmitting } = form.formState;
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      await fetchJson('/api/invitations/accept', { method: 'POST', body: values });
      router.replace('/sign-in?welcome=1');
    } catch (err) {
      setError(err instanceof Error ? err.message : 'Could not set the password.');
    }
  });
  return (
    <form onSubmit={onSubmit} className="space-y-3" noValidate>
      <Field label="New password" htmlFor="password" error={errors.password?.message} hint="At least 10 characters.">
        <Input id="password" type="password" autoComplete="new-password" aria-invalid={!!errors.password} {...form.register('password')} />
      </Field>
      <Field label="Repeat the password" htmlFor="confirm" error={errors.confirm?.message}>
        <Input id="confirm" type="password" autoComplete="new-password" aria-invalid={!!errors.confirm} {...form.register('confirm')} />
      </Field>
      {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
      <Button type="submit" className="w-full" disabled={isSubmitting}>Set password</Button>
    </form>
  );
}
