import { describe } from 'vitest';
import { sceneTests } from './scene-check';

describe('rendered scenes, second half', () => sceneTests(1));
