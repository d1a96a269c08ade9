/**
 * Publishing a new version of a route: pick the route, paste its template (or start from the
 * current version, or on the web choose a .json file), publish. The server checks the template
 * against the unit (checklists validateRoute); each of its messages is shown on its own line,
 * with the line of the pasted text it points at. A published version's number is shown.
 */
import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Field } from '@/components/field';
import { JsonFileInput } from '@/components/json-file-input';
import { ThemedText } from '@/components/themed-text';
import { fonts, space } from '@/constants/theme';
import { ApiError } from '@/lib/api-client';
import { usePublishVersion } from '@/hooks/queries/admin';
import { useSiteReference } from '@/hooks/queries/instruments';
import type { PublishVersionResponse } from '@/shared/api/admin';
import { jsonProblem, jsonValueLines, lineOfPath } from './json-lines';

export interface Issue {
  path: string;
  message: string;
  line: number | null;
}

/** The server's 400 details (or its message) as issues with the line of the text each points at. */
export function issuesOf(e: unknown, text: string): Issue[] {
  let lines: Map<string, number> = new Map();
  try {
    lines = jsonValueLines(text);
  } catch {
    // the text parsed for JSON.parse; our scanner is stricter only on odd escapes
  }
  if (e instanceof ApiError && Array.isArray(e.details) && e.details.length) {
    return (e.details as { path?: unknown; message?: unknown }[]).map((d) => {
      const path = typeof d.path === 'string' ? d.path : '';
      return {
        path: path.replace(/^template\.?/, '') || '(template)',
        message: String(d.message ?? ''),
        line: lineOfPath(lines, path),
      };
    });
  }
  return [{ path: '', message: e instanceof Error ? e.message : String(e), line: null }];
}

export function RoutesScreen() {
  const ref = useSiteReference();
  const publish = usePublishVersion();
  const routes = useMemo(() => [...(ref.data?.routes ?? [])].sort((a, b) => a.name.localeCompare(b.name)), [ref.data]);
  const [routeId, setRouteId] = useState<string | null>(null);
  const [text, setText] = useState('');
  const [issues, setIssues] = useState<Issue[]>([]);
  const [done, setDone] = useState<{ v: PublishVersionResponse; name: string } | null>(null);
  const route = routes.find((r) => r.id === routeId) ?? null;

  const reset = () => {
    setIssues([]);
    setDone(null);
  };

  const onPublish = () => {
    reset();
    if (!route) return;
    const bad = jsonProblem(text);
    if (bad) {
      setIssues([{ path: '', message: `Not JSON: ${bad.message}`, line: bad.line }]);
      return;
    }
    publish.mutate(
      { routeId: route.id, template: JSON.parse(text) },
      {
        onSuccess: (v) => setDone({ v, name: route.name }),
        onError: (e) => setIssues(issuesOf(e, text)),
      },
    );
  };

  return (
    <View style={styles.stack}>
      <ThemedText variant="heading">Routes</ThemedText>
      <ThemedText variant="label" muted>
        A route changes by publishing a new version of its template. Rounds under way keep the version they started on;
        phones take the new one on their next sync.
      </ThemedText>
      {ref.error ? (
        <ThemedText tone="danger" testID="routes-error">
          {ref.error.message}
        </ThemedText>
      ) : null}
      {ref.isPending ? <ThemedText muted>Loading…</ThemedText> : null}
      <Card testID="publish-routes">
        <ThemedText variant="label" bold>
          Route
        </ThemedText>
        <View style={styles.row}>
          {routes.map((r) => (
            <Button
              key={r.id}
              label={`${r.name} · version ${r.version.number}`}
              kind={routeId === r.id ? 'primary' : 'plain'}
              selected={routeId === r.id}
              testID={`publish-route-${r.version.template.id}`}
              style={styles.choice}
              onPress={() => {
                setRouteId(r.id);
                reset();
              }}
            />
          ))}
        </View>
      </Card>
      {route ? (
        <Card testID="publish-form">
          <ThemedText variant="label" bold>{`Template of ${route.name}`}</ThemedText>
          <View style={styles.row}>
            <Button
              label={`Start from version ${route.version.number}`}
              kind="plain"
              testID="publish-start-current"
              onPress={() => {
                setText(JSON.stringify(route.version.template, null, 2));
                reset();
              }}
            />
          </View>
          <JsonFileInput
            testID="publish-file"
            onText={(t) => {
              setText(t);
              reset();
            }}
            onError={(m) => setIssues([{ path: '', message: m, line: null }])}
          />
          <Field
            label="Template (JSON)"
            testID="publish-json"
            value={text}
            onChangeText={(t) => {
              setText(t);
              if (issues.length || done) reset();
            }}
            multiline
            autoCapitalize="none"
            autoCorrect={false}
            spellCheck={false}
            style={styles.json}
            hint="Paste the route template; the server checks it against the unit before it is published."
          />
          <Button
            label="Check and publish"
            testID="publish-submit"
            busy={publish.isPending}
            disabled={text.trim() === ''}
            onPress={onPublish}
          />
          {issues.length ? (
            <View style={styles.issues} testID="publish-issues" accessibilityRole="alert">
              <ThemedText
                variant="label"
                bold
                tone="danger"
              >{`Not published: ${issues.length} problem${issues.length === 1 ? '' : 's'}`}</ThemedText>
              {issues.map((i, n) => (
                <ThemedText key={n} variant="label" testID={`publish-issue-${n}`}>
                  {`${i.line !== null ? `Line ${i.line}` : '—'} · ${i.path ? `${i.path}: ` : ''}${i.message}`}
                </ThemedText>
              ))}
            </View>
          ) : null}
          {done ? (
            <ThemedText
              tone="ok"
              testID="publish-done"
            >{`✓ Published version ${done.v.number} of ${done.name} (${new Date(done.v.publishedAt).toLocaleString()}).`}</ThemedText>
          ) : null}
        </Card>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  stack: { gap: space.lg },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  json: { minHeight: 280, paddingVertical: space.sm, textAlignVertical: 'top', fontFamily: fonts.regular },
  issues: { gap: space.xs },
  choice: { maxWidth: '100%' },
});
