import type { Metadata } from 'next';
import Link from 'next/link';
import { AcceptInvitationForm } from '@/components/auth/accept-invitation-form';
import { Card, CardBody } from '@/components/ui/card';
import { findInvitation } from '@/lib/users/service';

export const metadata: Metadata = { title: 'Set your password' };

const MESSAGES = {
  unknown: 'This invitation link is not valid. Check that you copied all of it.',
  used: 'This invitation has already been used. Sign in with the password you set.',
  expired: 'This invitation has expired (links last 48 hours). Ask an admin to invite you again.',
};

export default async function InvitationPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const inv = await findInvitation(token);
  return (
    <Card>
      <CardBody className="space-y-4">
        <h1 className="text-lg font-semibold">Set your password</h1>
        {inv.state === 'valid' ? (
          <>
            <p className="text-sm text-muted">
              For <b className="text-ink">{inv.email}</b>, invited as {inv.role}.
            </p>
            <AcceptInvitationForm token={token} />
          </>
        ) : (
          <>
            <p role="alert" className="text-sm">{MESSAGES[inv.state]}</p>
            <Link href="/sign-in" className="text-sm text-heater-ink underline">Go to sign-in</Link>
          </>
        )}
      </CardBody>
    </Card>
  );
}
