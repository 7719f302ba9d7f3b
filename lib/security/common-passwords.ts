/**
 * Passwords that people choose most often, shipped with the app (no network look-up). Compiled from memory
 * of the widely published "most common passwords" lists (the top of every breach corpus looks alike:
 * digit runs, keyboard rows, "password", first names, sports, pets); entries are lower case. Bases shorter
 * than the minimum length are kept on purpose: lib/security/password-policy.ts also strips the digits and
 * symbols people tack on ("Password123!" → "password") and undoes common letter-for-digit swaps ("p4ssw0rd").
 */
export const COMMON_PASSWORDS: readonly string[] = [
  // digit runs and repeats
  '123456', '1234567', '12345678', '123456789', '1234567890', '12345678910', '0123456789', '0987654321',
  '987654321', '9876543210', '111111', '1111111111', '000000', '0000000000', '123123', '123123123', '121212',
  '112233', '123321', '654321', '666666', '696969', '777777', '888888', '999999', '1q2w3e4r', '1q2w3e4r5t',
  '1qaz2wsx', '1qaz2wsx3edc', 'zaq12wsx', 'q1w2e3r4', 'q1w2e3r4t5', 'a1b2c3d4', 'abc123', 'abcd1234',
  'abcdef', 'abcdefg', 'abcdefgh', 'abcdefghij', 'aaaaaa', 'aaaaaaaaaa',
  // keyboard rows
  'qwerty', 'qwertyu', 'qwertyui', 'qwertyuiop', 'qwertz', 'qwertzuiop', 'azerty', 'azertyuiop', 'asdfgh',
  'asdfghjk', 'asdfghjkl', 'zxcvbn', 'zxcvbnm', 'qazwsx', 'qazwsxedc', 'qweasd', 'qweasdzxc', '1qazxsw2',
  'asdf1234', 'qwer1234', 'zxcv1234', 'poiuytrewq', 'mnbvcxz', 'lkjhgfdsa',
  // the word itself and friends
  'password', 'passw0rd', 'passwort', 'passwd', 'pass', 'pass1234', 'password1', 'password12', 'password123',
  'password1234', 'mypassword', 'thepassword', 'newpassword', 'changeme', 'changeit', 'secret', 'topsecret',
  'letmein', 'letmeinnow', 'welcome', 'welcome1', 'welcomehome', 'admin', 'administrator', 'root', 'toor',
  'login', 'guest', 'default', 'master', 'access', 'iloveyou', 'iloveyou2', 'loveyou', 'trustno1', 'whatever',
  'nothing', 'anything', 'something', 'test', 'tester', 'testing', 'test1234', 'testtest', 'temp', 'temppass',
  'user', 'username', 'qwerty123', 'qwerty1234', 'qwertyuiop123', 'superman', 'batman', 'spiderman',
  'starwars', 'pokemon', 'computer', 'internet', 'samsung', 'google', 'apple', 'facebook', 'linkedin',
  'microsoft', 'windows', 'freedom', 'hello', 'helloworld', 'hellothere', 'goodbye', 'princess', 'sunshine',
  'shadow', 'dragon', 'monkey', 'master123', 'killer', 'ninja', 'mustang', 'ferrari', 'porsche', 'mercedes',
  'corvette', 'harley', 'yamaha', 'matrix', 'phoenix', 'rainbow', 'flower', 'butterfly', 'chocolate',
  'cookie', 'cheese', 'banana', 'orange', 'pepper', 'ginger', 'summer', 'winter', 'spring', 'autumn',
  'monday', 'friday', 'january', 'august', 'october', 'december', 'forever', 'lovely', 'angel', 'beautiful',
  'blessed', 'jesus', 'jesuschrist', 'christ', 'god', 'heaven', 'hunter', 'hunter2', 'soccer', 'football',
  'baseball', 'basketball', 'hockey', 'golfer', 'tennis', 'liverpool', 'arsenal', 'chelsea', 'manchester',
  'barcelona', 'realmadrid', 'juventus', 'yankees', 'cowboys', 'eagles', 'steelers', 'lakers', 'tigers',
  'dolphins', 'diamond', 'silver', 'golden', 'jordan', 'jordan23', 'michael', 'jennifer', 'jessica',
  'ashley', 'daniel', 'thomas', 'robert', 'william', 'charlie', 'andrew', 'joshua', 'matthew', 'anthony',
  'nicole', 'michelle', 'amanda', 'melissa', 'elizabeth', 'alexander', 'maverick', 'buster', 'tigger',
  'pussycat', 'kitten', 'puppy', 'doggie', 'snoopy', 'pepper123', 'bailey', 'maggie', 'charlie123',
  'qwerty12345', 'iloveyou123', 'loveme', 'lovelove', 'letmein123', 'welcome123', 'admin123', 'admin1234',
  'administrator1', 'root1234', 'passpass', 'zaq1zaq1', 'zaq1xsw2', 'qwe123', 'qwe12345', 'asd123',
  'zxc123', 'aa123456', 'a123456', 'a12345678', 'abc12345', 'abcabc', 'abcabc123', 'football1', 'baseball1',
  'sunshine1', 'princess1', 'monkey123', 'dragon123', 'shadow123', 'superman1', 'trustno1!', 'starwars1',
  // the trade and this app: guessed first by anyone who knows where they are
  'gridproof', 'spoilboard', 'router', 'cncrouter', 'cnc', 'cncmachine', 'machinist', 'workshop', 'woodshop',
  'woodworking', 'carpenter', 'joiner', 'maker', 'makerspace', 'fablab', 'milling', 'lathe', 'tablesaw',
  'router123', 'workshop1',
];
