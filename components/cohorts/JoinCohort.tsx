import { useEffect, useRef } from 'react';
import { View } from 'react-native';
import { space } from '../../constants/theme';
import { useJoinCohort } from '../../hooks/cohorts';
import { useSession } from '../../hooks/session';
import { Button } from '../Button';
import { Panel } from '../Panel';
import { Screen } from '../Screen';
import { Empty, ErrorState, Loading, Notice } from '../States';
import { Txt } from '../Txt';

/**
 * Where an invitation mail's link lands (`/cohorts/join?code=…`): a student joins at once,
 * since following the link is the request; anyone else is told why nothing happened.
 */
export function JoinCohort({ code }: { code: string | undefined }) {
  const session = useSession();
  const join = useJoinCohort();
  const { mutate } = join;
  const student = session.data?.role === 'student';
  // One attempt per code, even when effects run twice in development.
  const tried = useRef<string | null>(null);
  useEffect(() => {
    if (!code || !student || tried.current === code) return;
    tried.current = code;
    mutate(code);
  }, [code, student, mutate]);

  const back = (
    <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: space.sm }}>
      <Button small label="Start a run" href="/runs/new" />
      <Button small tone="secondary" label="Your account" href="/account" />
    </View>
  );
  let body;
  if (!code) body = <Empty title="This link has no enrolment code" hint="Open the link from the invitation mail again, or type the code on your account page." action={back} />;
  else if (session.data && !student)
    body = (
      <Notice tone="warning">{`Only students join cohorts; you are signed in as ${session.data.name}, ${session.data.role}. Sign out and sign in with your student account to use this invitation.`}</Notice>
    );
  else if (join.isError) body = <ErrorState error={join.error} title="Could not join" onRetry={() => join.mutate(code)} />;
  else if (join.isSuccess)
    body = (
      <Panel title={`You joined ${join.data.cohort.name}`}>
        <View style={{ gap: space.md }} testID="joined">
          <Txt variant="body">{`${join.data.cohort.instructor.name} runs this cohort. Your runs now count against its quota, and its templates appear on your account page.`}</Txt>
          {back}
        </View>
      </Panel>
    );
  else body = <Loading what="Joining the cohort" />;
  return (
    <Screen title="Join a cohort" subtitle={code ? `Enrolment code ${code}` : undefined}>
      {body}
    </Screen>
  );
}
