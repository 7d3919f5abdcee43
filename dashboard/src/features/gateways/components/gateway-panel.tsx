import { useState, type FormEvent } from 'react';
import { FormError, FormField } from '../../../components/form-field';
import { SafetyCaution } from '../../../components/safety-caution';
import { Empty, QueryState } from '../../../components/states';
import { formErrors } from '../../../lib/form-errors';
import { usePersonSettings } from '../../../lib/person-settings';
import { formatAgo, formatDateTime } from '../../../lib/time-format';
import {
  type Gateway,
  type GatewayWithSecret,
  useCreateGateway,
  useGatewayAction,
  useGateways,
} from '../api/gateways';
import { useRejects } from '../api/get-rejects';

/** A site's gateways: add one (its secret is shown once), rotate, revoke, recent rejects. */
export function GatewayPanel(props: { siteId: string; isAdmin: boolean; mqttHost: string }) {
  const gateways = useGateways(props.siteId);
  const [issued, setIssued] = useState<GatewayWithSecret | null>(null);
  return (
    <section aria-label="Gateways" className="space-y-3">
      {issued && (
        <SecretOnce issued={issued} mqttHost={props.mqttHost} onDone={() => setIssued(null)} />
      )}
      {props.isAdmin && !issued && <CreateGateway siteId={props.siteId} onCreated={setIssued} />}
      <QueryState query={gateways} what="The gateways could not be loaded.">
        {(list) =>
          list.length === 0 ? (
            <Empty title="No gateway yet">
              Add one to start receiving readings from this site.
            </Empty>
          ) : (
            <ul className="space-y-2">
              {list.map((g) => (
                <GatewayItem
                  key={g.id}
                  siteId={props.siteId}
                  gateway={g}
                  isAdmin={props.isAdmin}
                  onIssued={setIssued}
                />
              ))}
            </ul>
          )
        }
      </QueryState>
    </section>
  );
}

function CreateGateway(props: { siteId: string; onCreated: (g: GatewayWithSecret) => void }) {
  const create = useCreateGateway(props.siteId);
  const [id, setId] = useState('');
  const [name, setName] = useState('');
  const [local, setLocal] = useState<string>();
  const server = formErrors(create.error);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!/^[a-z0-9][a-z0-9-]{2,63}$/.test(id)) {
      return setLocal('3–64 lower-case letters, digits or -, starting with a letter or digit');
    }
    setLocal(undefined);
    create.mutate({ id, name: name.trim() }, { onSuccess: props.onCreated });
  };
  return (
    <form
      onSubmit={submit}
      noValidate
      className="wk-card grid gap-3 p-4 sm:grid-cols-[1fr_1fr_auto] sm:items-end"
      aria-label="Add a gateway"
    >
      <FormField
        label="Gateway id"
        value={id}
        onChange={(e) => setId(e.target.value.toLowerCase())}
        error={local ?? server.fields.id}
        placeholder="e.g. ridge-gw-1"
      />
      <FormField
        label="Name (optional)"
        value={name}
        onChange={(e) => setName(e.target.value)}
        error={server.fields.name}
      />
      <button type="submit" className="wk-button" disabled={create.isPending}>
        Add gateway
      </button>
      <div className="sm:col-span-3">
        <FormError message={server.message} />
      </div>
    </form>
  );
}

function SecretOnce(props: { issued: GatewayWithSecret; mqttHost: string; onDone: () => void }) {
  const [copied, setCopied] = useState(false);
  const { issued } = props;
  const rows: [string, string][] = [
    ['Broker', props.mqttHost],
    ['Client id', issued.mqtt.clientId],
    ['User name', issued.mqtt.username],
    ['Password (secret)', issued.secret],
    ['Publish to', issued.mqtt.topic],
  ];
  return (
    <div role="alert" className="wk-card space-y-3 border-wk-sun p-4">
      <h3 className="font-semibold text-wk-ink-strong">Gateway {issued.gateway.id} is ready</h3>
      <p className="text-wk-ink">
        Copy the secret now: Wellkept keeps only a hash of it and cannot show it again.
      </p>
      <dl className="grid gap-x-4 gap-y-1 sm:grid-cols-[auto_1fr]">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="wk-label self-center">{k}</dt>
            <dd className="break-all font-mono text-wk-ink-strong" data-field={k}>
              {v}
            </dd>
          </div>
        ))}
      </dl>
      <SafetyCaution topics={['wiring']} />
      <div className="flex gap-2">
        <button
          type="button"
          className="wk-button"
          onClick={() =>
            void navigator.clipboard?.writeText(issued.secret).then(
              () => setCopied(true),
              () => setCopied(false),
            )
          }
        >
          {copied ? 'Copied' : 'Copy secret'}
        </button>
        <button type="button" className="wk-button-quiet" onClick={props.onDone}>
          I have stored it
        </button>
      </div>
    </div>
  );
}

function GatewayItem(props: {
  siteId: string;
  gateway: Gateway;
  isAdmin: boolean;
  onIssued: (g: GatewayWithSecret) => void;
}) {
  const { gateway } = props;
  const { timeZone } = usePersonSettings();
  const action = useGatewayAction(props.siteId);
  const [showRejects, setShowRejects] = useState(false);
  return (
    <li className="wk-card p-3">
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <p className="font-mono font-semibold text-wk-ink-strong">{gateway.id}</p>
          <p className="text-label text-wk-ink-soft">
            {gateway.name || 'no name'} ·{' '}
            {gateway.status === 'revoked'
              ? 'revoked'
              : gateway.online
                ? 'connected'
                : 'not connected'}
            {gateway.lastSeenAt && (
              <>
                {' '}
                · last heard{' '}
                <time
                  dateTime={gateway.lastSeenAt}
                  title={formatDateTime(gateway.lastSeenAt, timeZone)}
                >
                  {formatAgo(gateway.lastSeenAt)}
                </time>
              </>
            )}
          </p>
        </div>
        <div className="flex flex-wrap gap-2">
          <button
            type="button"
            className="wk-button-quiet"
            aria-expanded={showRejects}
            onClick={() => setShowRejects(!showRejects)}
          >
            Recent rejects
          </button>
          {props.isAdmin && gateway.status === 'active' && (
            <>
              <button
                type="button"
                className="wk-button-quiet"
                onClick={() =>
                  action.mutate(
                    { gatewayId: gateway.id, action: 'rotate' },
                    { onSuccess: (r) => 'secret' in r && props.onIssued(r) },
                  )
                }
              >
                New secret
              </button>
              <button
                type="button"
                className="wk-button-quiet text-wk-act"
                onClick={() => {
                  if (
                    window.confirm(`Revoke ${gateway.id}? It will no longer be able to connect.`)
                  ) {
                    action.mutate({ gatewayId: gateway.id, action: 'revoke' });
                  }
                }}
              >
                Revoke
              </button>
            </>
          )}
        </div>
      </div>
      <FormError message={formErrors(action.error).message} />
      {showRejects && <Rejects siteId={props.siteId} gatewayId={gateway.id} />}
    </li>
  );
}

function Rejects(props: { siteId: string; gatewayId: string }) {
  const rejects = useRejects(props.siteId, props.gatewayId);
  const { timeZone } = usePersonSettings();
  return (
    <div className="mt-2">
      <QueryState query={rejects} what="The rejects could not be loaded.">
        {(list) =>
          list.length === 0 ? (
            <Empty title="Nothing refused recently" />
          ) : (
            <ul className="divide-y divide-wk-line text-label">
              {list.map((r) => (
                <li key={r.id} className="py-1.5">
                  <span className="font-mono">{formatDateTime(r.receivedAt, timeZone)}</span>
                  {r.recordName && (
                    <span className="ml-2 font-mono text-wk-ink-soft">{r.recordName}</span>
                  )}
                  <span className="block text-wk-ink">{r.reason}</span>
                </li>
              ))}
            </ul>
          )
        }
      </QueryState>
    </div>
  );
}
