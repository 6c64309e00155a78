// All services of the app, built once per app instance from the database, config and mail transport.
import type { Transporter } from 'nodemailer';
import type { Config } from '../config';
import type { Db } from '../db/client';
import { createAuthService } from './auth';
import { createDistributionService } from './bulletins/distribution';
import { createBulletinService } from './bulletins/service';
import { createInvitationService } from './invitations';
import { createMailService } from './mail';
import { createObjectService } from './objects';
import { createAstrometryService } from './od/astrometry';
import { createFitService } from './od/fits';
import { createObservatoryService } from './od/observatories';
import { createPublicSite } from './releases/publicSite';
import { createReleaseScheduler } from './releases/scheduler';
import { createReleaseService } from './releases/service';
import { officeName } from './settings';
import { createRunService } from './runs/service';
import { SqliteSessionStore } from './sessionStore';
import { createUserService } from './users';

export interface ServiceDeps {
  db: Db;
  config: Config;
  mailTransport: Transporter;
}

export function createServices({ db, config, mailTransport }: ServiceDeps) {
  const sessionStore = new SqliteSessionStore(db, config.session);
  const mail = createMailService(db, mailTransport, config.mailFrom);
  const invitations = createInvitationService(db, mail, config.publicUrl);
  const auth = createAuthService(db, sessionStore);
  const users = createUserService(db, sessionStore, invitations);
  const objects = createObjectService(db);
  const runs = createRunService(db);
  // Orbit determination (issue 8). The fit runner is started by server/index.ts (tests start it when they need it).
  const observatories = createObservatoryService(db);
  const astrometry = createAstrometryService(db);
  const fits = createFitService(db, { objects, astrometry, observatories });
  const bulletins = createBulletinService(db);
  const distributions = createDistributionService(db, bulletins, mail, config.publicUrl);
  const office = () => officeName(db);
  const releases = createReleaseService(db, mail, { publicUrl: config.publicUrl, officeName: office });
  const publicSite = createPublicSite(releases, { publicUrl: config.publicUrl, officeName: office });
  // Not started here: server/index.ts starts it (tests start it when they need it).
  const releaseScheduler = createReleaseScheduler(releases);
  return { db, config, sessionStore, mail, invitations, auth, users, objects, runs, observatories, astrometry, fits, bulletins, distributions, releases, publicSite, releaseScheduler };
}
export type Services = ReturnType<typeof createServices>;
