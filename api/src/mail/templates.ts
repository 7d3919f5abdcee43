/** Plain-text e-mails the API sends; short, with the link on its own line. */

export function invitationMail(input: {
  companyName: string;
  inviterName: string;
  role: string;
  link: string;
  expiresAt: Date;
}): { subject: string; text: string } {
  const roleWords =
    input.role === 'owner'
      ? 'see your water system'
      : input.role === 'technician'
        ? 'review sites and record service visits'
        : 'manage sites, equipment and people';
  return {
    subject: `${input.companyName} invited you to Wellkept`,
    text: [
      `${input.inviterName} at ${input.companyName} invited you to Wellkept, where you can ${roleWords}.`,
      '',
      'Choose your password here:',
      input.link,
      '',
      `The link works once and expires on ${input.expiresAt.toUTCString()}.`,
      'If you were not expecting this, you can ignore this message.',
    ].join('\n'),
  };
}

export function passwordResetMail(input: { link: string; expiresAt: Date }): {
  subject: string;
  text: string;
} {
  return {
    subject: 'Reset your Wellkept password',
    text: [
      'Someone (hopefully you) asked to reset the password of your Wellkept account.',
      '',
      'Choose a new password here:',
      input.link,
      '',
      `The link works once and expires on ${input.expiresAt.toUTCString()}.`,
      'If you did not ask for this, ignore this message: your password stays as it is.',
    ].join('\n'),
  };
}
