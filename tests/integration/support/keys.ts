import { generateSshKeyPair } from "../../../server/crypto/ssh-keys";

/**
 * An ed25519 key pair shaped like ssh2's `utils.generateKeyPairSync` result ({ private, public }), made
 * by Sigmaflow's own encoder: ssh2's generator writes about one key in two hundred that it cannot read
 * back (it drops leading zero bytes), which would make tests fail at random.
 */
export function testKeyPair(comment = "sigmaflow-test"): { private: string; public: string } {
  const pair = generateSshKeyPair(comment);
  return { private: pair.privateKey, public: pair.publicKey };
}
