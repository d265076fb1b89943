import fs from 'node:fs';
import type { ConnectionOptions } from 'node:tls';

/** A TLS setting that cannot be used: the message names the variable (and parameter) to fix. */
export class PostgresTlsError extends Error {}

/** What the `pg` driver is given: the URL without its TLS parameters, and its `ssl` option. */
export interface PostgresTls {
  url: string;
  /** false: no TLS. */
  ssl: ConnectionOptions | false;
}

/** The URL parameters this module reads; they are taken out before the URL reaches Sequelize and the driver. */
const TLS_PARAMETERS = ['sslmode', 'sslrootcert', 'sslcert', 'sslkey', 'ssl'] as const;
const SSL_MODES = ['disable', 'allow', 'prefer', 'require', 'verify-ca', 'verify-full'] as const;
type SslMode = (typeof SSL_MODES)[number];

/**
 * The `pg` driver's TLS option (the options of Node's tls.connect) for KINEFOLD_DATABASE_URL and
 * KINEFOLD_DATABASE_CA, with libpq's meaning of `sslmode`:
 *
 * - `disable`: no TLS;
 * - `require`: TLS, the certificate not checked, unless a CA is given, when it is checked as for `verify-ca`;
 * - `verify-ca`: TLS, the certificate must chain to the CA (`sslrootcert` or KINEFOLD_DATABASE_CA), any host name;
 * - `verify-full`: TLS, the certificate must chain to the CA (or, with none given, to Node's public CAs) and name
 *   the host of the URL;
 * - no `sslmode`: `verify-full` when KINEFOLD_DATABASE_CA is set, otherwise no TLS. The URL and
 *   KINEFOLD_DATABASE_CA alone decide: the driver's own reading of PGSSLMODE is not used.
 *
 * `allow` and `prefer` are refused: they fall back to an unencrypted connection, which the driver cannot do.
 * `sslcert` and `sslkey` give a client certificate. Sequelize hands the URL's parameters to the driver's own parser
 * too, which reads `sslmode` differently (every mode but `disable` as `verify-full`): the TLS parameters are
 * therefore removed from the URL passed on, and this option given instead.
 */
export function postgresTls(
  databaseUrl: string,
  caFile: string | null,
  readFile: (file: string) => string = (file) => fs.readFileSync(file, 'utf8'),
): PostgresTls {
  const url = new URL(databaseUrl);
  const parameter = (name: (typeof TLS_PARAMETERS)[number]) => url.searchParams.get(name);
  if (parameter('ssl') !== null) {
    throw new PostgresTlsError(
      'KINEFOLD_DATABASE_URL: use sslmode=require, verify-ca or verify-full instead of the ssl parameter',
    );
  }
  const mode = parameter('sslmode') as SslMode | null;
  if (mode !== null && !SSL_MODES.includes(mode)) {
    throw new PostgresTlsError(`KINEFOLD_DATABASE_URL: sslmode must be one of ${SSL_MODES.join(', ')} (got "${mode}")`);
  }
  if (mode === 'allow' || mode === 'prefer') {
    throw new PostgresTlsError(
      `KINEFOLD_DATABASE_URL: sslmode=${mode} may fall back to an unencrypted connection, which the pg driver ` +
        'cannot do; use require, verify-ca or verify-full (or disable)',
    );
  }
  const read = (file: string, source: string) => {
    try {
      return readFile(file);
    } catch (error) {
      throw new PostgresTlsError(`${source}: cannot read ${file} (${(error as NodeJS.ErrnoException).code ?? error})`);
    }
  };
  const rootcert = parameter('sslrootcert');
  const ca = rootcert
    ? read(rootcert, 'KINEFOLD_DATABASE_URL sslrootcert')
    : caFile
      ? read(caFile, 'KINEFOLD_DATABASE_CA')
      : undefined;
  const certFile = parameter('sslcert');
  const keyFile = parameter('sslkey');
  if (Boolean(certFile) !== Boolean(keyFile)) {
    throw new PostgresTlsError(
      'KINEFOLD_DATABASE_URL: sslcert and sslkey go together (a client certificate and its key)',
    );
  }
  const client = certFile
    ? { cert: read(certFile, 'KINEFOLD_DATABASE_URL sslcert'), key: read(keyFile!, 'KINEFOLD_DATABASE_URL sslkey') }
    : {};
  for (const name of TLS_PARAMETERS) url.searchParams.delete(name);
  const plain = url.toString();

  const effective: SslMode | null = mode ?? (ca ? 'verify-full' : null);
  if (effective === null) {
    if (certFile) throw new PostgresTlsError('KINEFOLD_DATABASE_URL: sslcert needs an sslmode (require or stricter)');
    return { url: plain, ssl: false };
  }
  if (effective === 'disable') {
    if (ca || certFile) {
      const given = rootcert || certFile ? 'a certificate in the URL' : 'KINEFOLD_DATABASE_CA';
      throw new PostgresTlsError(`KINEFOLD_DATABASE_URL: sslmode=disable turns TLS off, yet ${given} is given`);
    }
    return { url: plain, ssl: false };
  }
  if (effective === 'verify-ca' && !ca) {
    throw new PostgresTlsError(
      'KINEFOLD_DATABASE_URL: sslmode=verify-ca needs the CA certificate (sslrootcert=FILE or KINEFOLD_DATABASE_CA)',
    );
  }
  if (effective === 'require' && !ca) return { url: plain, ssl: { rejectUnauthorized: false, ...client } };
  const anyHostName = effective === 'require' || effective === 'verify-ca';
  return {
    url: plain,
    ssl: {
      rejectUnauthorized: true,
      ...(ca ? { ca } : {}),
      ...(anyHostName ? { checkServerIdentity: () => undefined } : {}),
      ...client,
    },
  };
}
