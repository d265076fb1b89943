import { Project, type User } from '../../server/core/models';
import { addUser, signedInAgent, type TestServer } from './test-server';

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;

export interface ReviewCast {
  uploader: User;
  curatorUser: User;
  operator: SignedIn;
  engineer: SignedIn;
  curator: SignedIn;
  secondCurator: SignedIn;
  admin: SignedIn;
  projectId: number;
}

/** The people every review test needs (one per role, plus a second curator) and a project of their own. */
export async function castForReview(server: TestServer, projectName: string): Promise<ReviewCast> {
  const uploader = await addUser(server, 'operator');
  await addUser(server, 'engineer');
  const curatorUser = await addUser(server, 'curator');
  const second = await addUser(server, 'curator', 'second-curator@example.test');
  await second.update({ name: 'Second curator' });
  await addUser(server, 'admin');
  const project = await Project.create({
    name: projectName,
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1],
    flagThresholds: {},
  });
  return {
    uploader,
    curatorUser,
    operator: await signedInAgent(server, 'operator@example.test'),
    engineer: await signedInAgent(server, 'engineer@example.test'),
    curator: await signedInAgent(server, 'curator@example.test'),
    secondCurator: await signedInAgent(server, 'second-curator@example.test'),
    admin: await signedInAgent(server, 'admin@example.test'),
    projectId: project.id,
  };
}
