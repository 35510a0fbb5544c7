export { attachCollab, type CollabServer, type CollabDeps } from './server';
export { collabOptionsFromEnv, DEFAULT_COLLAB_OPTIONS, type CollabOptions } from './config';
export { announceBoardChange, BOARD_CHANNEL } from './notify';
export { loadBoardAccess, type BoardAccess, type BoardViewer } from './access';
export { readDocument, compact } from './persistence';
